// Submits the identity provider's sign-out confirmation by itself, pressing the button so that
// its name/value pair is sent; the button stays there for browsers without script.
document.addEventListener('DOMContentLoaded', () => {
  const button = document.querySelector('button[data-auto-submit]')
  if (button) button.click()
})

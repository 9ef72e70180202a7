/** tus hooks refuse by throwing { status_code, body }; our bodies are problem+json, like the API's. */
export function refuse(status: number, title: string, detail: string): { status_code: number; body: string } {
  return { status_code: status, body: JSON.stringify({ type: '/problems/upload', title, status, detail }) }
}

// Lato is bundled with the client; no font is ever fetched from another site.
import '@fontsource/lato/300.css'
import '@fontsource/lato/400.css'
import '@fontsource/lato/400-italic.css'
import '@fontsource/lato/700.css'
import '@fontsource/lato/900.css'
import './main.css'

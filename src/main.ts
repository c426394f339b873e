// Fonts and icons come from npm packages and are bundled; nothing is loaded from a CDN. Roboto
// Condensed in the weights the app uses (400 body, 500 Quasar's buttons and labels, 700 bold); the
// browser fetches only the woff2 subsets a page needs. One icon
// font (Material Icons); the few MDI icons are inline SVG paths (src/icons.ts).
import '@fontsource/roboto-condensed/400.css'
import '@fontsource/roboto-condensed/500.css'
import '@fontsource/roboto-condensed/700.css'
import '@quasar/extras/material-icons/material-icons.css'
import 'quasar/src/css/index.sass'
import './styles/app.sass'

// Plain-words messages for the zod schemas the forms check with (the same map as the server's).
import '../shared/schemas/messages'
import { createApp } from 'vue'
import { createPinia } from 'pinia'
import { Dialog, Notify, Quasar } from 'quasar'
import { abilitiesPlugin } from '@casl/vue'
import App from './App.vue'
import { router } from './router'
import { useAuthStore } from './stores/auth'
import { readStoredDarkMode } from './composables/useDarkMode'
import { iconMapFn } from './icons'

const app = createApp(App)
const pinia = createPinia()
app.use(pinia)
app.use(Quasar, {
  plugins: { Notify, Dialog },
  config: { dark: readStoredDarkMode(), notify: { position: 'top', timeout: 3000 } },
})
// `mdi-*` names are drawn from SVG paths (src/icons.ts); everything else by the Material Icons font.
app.config.globalProperties.$q.iconMapFn = iconMapFn
app.use(abilitiesPlugin, useAuthStore(pinia).ability, { useGlobalProperties: true })
app.use(router)
app.mount('#app')

// Fonts and icons come from npm packages and are bundled; nothing is loaded from a CDN.
import '@fontsource/roboto-condensed/400.css'
import '@fontsource/roboto-condensed/500.css'
import '@fontsource/roboto-condensed/700.css'
import '@quasar/extras/material-icons/material-icons.css'
import '@quasar/extras/mdi-v7/mdi-v7.css'
import 'quasar/src/css/index.sass'
import './styles/app.sass'

import { createApp } from 'vue'
import { createPinia } from 'pinia'
import { Dialog, Notify, Quasar } from 'quasar'
import { abilitiesPlugin } from '@casl/vue'
import App from './App.vue'
import { router } from './router'
import { useAuthStore } from './stores/auth'
import { readStoredDarkMode } from './composables/useDarkMode'

const app = createApp(App)
const pinia = createPinia()
app.use(pinia)
app.use(Quasar, {
  plugins: { Notify, Dialog },
  config: { dark: readStoredDarkMode(), notify: { position: 'top', timeout: 3000 } },
})
app.use(abilitiesPlugin, useAuthStore(pinia).ability, { useGlobalProperties: true })
app.use(router)
app.mount('#app')

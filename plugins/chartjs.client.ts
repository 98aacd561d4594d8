import { BarElement, CategoryScale, Chart, Filler, Legend, LinearScale, LineElement, PointElement, Tooltip } from 'chart.js'

// Chart.js is tree-shaken: register only what Torquewright's charts draw, with our type and colours.
export default defineNuxtPlugin(() => {
  Chart.register(LineElement, PointElement, BarElement, LinearScale, CategoryScale, Tooltip, Legend, Filler)
  Chart.defaults.font.family = 'Manrope, ui-sans-serif, system-ui, sans-serif'
  Chart.defaults.color = '#4a5163'
  Chart.defaults.borderColor = 'rgba(29,34,48,0.08)'
})

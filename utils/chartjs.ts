import { BarElement, CategoryScale, Chart, Filler, Legend, LinearScale, LineElement, PointElement, Tooltip } from 'chart.js'

// Chart.js is tree-shaken: register only what Torquewright's charts draw, with our type and colours.
// The chart components import this module, so Chart.js loads with the pages that draw a chart and
// never with the entry chunk. Registering twice is harmless; this runs once per bundle.
Chart.register(LineElement, PointElement, BarElement, LinearScale, CategoryScale, Tooltip, Legend, Filler)
Chart.defaults.font.family = 'Manrope, ui-sans-serif, system-ui, sans-serif'
Chart.defaults.color = '#4a5163'
Chart.defaults.borderColor = 'rgba(29,34,48,0.08)'

/** The configured Chart.js, for a chart component that needs it directly. */
export const configuredChart = Chart

import { BarElement, CategoryScale, Chart, Filler, Legend, LinearScale, LineElement, PointElement, Tooltip } from 'chart.js'
import { Bar, Line, Scatter } from 'vue-chartjs'

// Chart.js is tree-shaken: register only what Torquewright's charts draw, with our type and colours.
// The chart components load this module with a dynamic import (utils/chart-loader.ts), so Chart.js reaches the
// browser only when a chart is drawn and is never part of the entry chunk or a page's first load.
Chart.register(LineElement, PointElement, BarElement, LinearScale, CategoryScale, Tooltip, Legend, Filler)
Chart.defaults.font.family = 'Manrope, ui-sans-serif, system-ui, sans-serif'
Chart.defaults.color = '#4a5163'
Chart.defaults.borderColor = 'rgba(29,34,48,0.08)'

/** The vue-chartjs components, configured; chart components take them through loadChart (utils/chart-loader.ts). */
export const chartComponents = { Bar, Line, Scatter }

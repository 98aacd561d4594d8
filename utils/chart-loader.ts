import type { Component } from 'vue'
import type { chartComponents } from './chartjs'

type ChartKind = keyof typeof chartComponents
const loaded = new Map<ChartKind, Component>()

/**
 * An async component of one chart type: Chart.js and vue-chartjs (utils/chartjs.ts) load with the first
 * chart drawn, so they stay out of the entry chunk and out of every page's first load (the charts
 * draw in the browser alone, inside ClientOnly). One definition per kind, made once.
 */
export function loadChart(kind: ChartKind): Component {
  let component = loaded.get(kind)
  if (!component) loaded.set(kind, component = defineAsyncComponent(() => import('./chartjs').then(m => m.chartComponents[kind])))
  return component
}

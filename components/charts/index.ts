export { AreaPerLayerChart, binMax, type AreaPerLayerChartProps } from './AreaPerLayerChart';

// Reusable charts (chart.js via react-chartjs-2): spectrum bars, and one line chart for THD against drive,
// transfer curves and I–V curves. Import from here so chart.js is registered first.
import './setup';
export { SpectrumBars, type SpectrumSeries } from './SpectrumBars';
export { LineChart, type LineSeries } from './LineChart';
export { SERIES_COLOURS } from './setup';
export { ThdDriveChart, TransferChart, IvChart } from './curves';
export { deviceLook, type DeviceLook } from './device-colours';

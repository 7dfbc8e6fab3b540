// chart.js is tree-shaken: register only what the catalog's charts use, once.
import { BarController, BarElement, CategoryScale, LineController, Chart, Filler, Legend, LinearScale, LineElement, LogarithmicScale, PointElement, Tooltip } from 'chart.js';

// The controllers too, for mixed charts drawn through react-chartjs-2's generic <Chart> (bars with markers on top).
Chart.register(BarController, LineController, BarElement, CategoryScale, LinearScale, LogarithmicScale, LineElement, PointElement, Tooltip, Legend, Filler);
Chart.defaults.font.family = "'Source Sans 3', system-ui, sans-serif";
Chart.defaults.color = '#4a4740';
// Charts redraw on every slider step: animation would lag behind the hand.
Chart.defaults.animation = false;

/** Series colours from the Kneepoint palette (spruce, copper, amber, ink), distinguishable side by side. */
export const SERIES_COLOURS = ['#3c5249', '#c0602f', '#e3a53a', '#1c1b19', '#2d6a3e', '#a3212b'];

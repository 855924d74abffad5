export { ResultsPanel } from "./results-panel";

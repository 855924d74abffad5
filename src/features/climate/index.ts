export { ClimatePanel, type ClimatePanelProps } from "./climate-panel";

export { RiskPanel, type RiskPanelProps } from "./risk-panel";

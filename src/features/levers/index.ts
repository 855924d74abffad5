export { LeversPanel, type LeversPanelProps } from "./levers-panel";

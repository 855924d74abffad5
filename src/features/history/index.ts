export { HistoryPanel, type HistoryPanelProps } from "./history-panel";

export { ExportPanel, type ExportPanelProps } from "./export-panel";

export { ReportDocument } from "./report-document";
export { StudyExportPanel } from "./study-export-panel";

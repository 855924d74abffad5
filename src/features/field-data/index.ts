export { DatasetsTable, KIND_LABEL } from "./datasets-panel";
export { UploadWizard } from "./upload-wizard";
export { CountsView } from "./counts-view";
export { FatesView } from "./fates-view";

/** The open life cycle's state: document and undo history, autosave with conflict handling, live analysis, and the header's parts. */
export { useLifeCycleEditor, AUTOSAVE_DELAY_MS, type LifeCycleEditor, type SaveState } from "./use-life-cycle-editor";
export { useLiveAnalysis, ANALYSIS_DEBOUNCE_MS } from "./use-live-analysis";
export { SaveStatus } from "./save-status";
export { ConflictBanner, copyName } from "./conflict-banner";
export { LambdaReadout, formatLambda } from "./lambda-readout";
export { UndoRedoButtons } from "./undo-redo-buttons";
export { NameField } from "./name-field";
export { historyReducer, startHistory, type DocumentHistory, type HistoryEntry } from "./document-history";

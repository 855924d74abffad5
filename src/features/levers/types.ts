import type { EditorPanelProps } from "../../lib/editor-types";

export interface LeversPanelProps extends EditorPanelProps {
  lifeCycleId: string;
  studyId: string;
  /** The editor's revision of `document` (results are cached per revision). */
  revision: number;
  /** Risk runs use the saved life cycle, so one starts only when nothing is pending. */
  saveStatus: "saved" | "unsaved" | "saving" | "invalid" | "failed" | "conflict";
}

/** The Diagram tab of the life-cycle editor: stages, arrows, inspector, automatic layout, SVG/PNG export. */
export { DiagramPanel } from "./diagram-panel";
export { DiagramPanel as default } from "./diagram-panel";

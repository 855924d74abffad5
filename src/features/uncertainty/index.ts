export { UncertaintyPanel, type UncertaintyPanelProps } from "./uncertainty-panel";

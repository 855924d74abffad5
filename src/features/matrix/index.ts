export { MatrixPanel } from "./matrix-panel";

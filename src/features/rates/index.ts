export { RatesPanel } from "./rates-panel";

export { ApiGuide } from "./api-guide";

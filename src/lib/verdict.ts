// Moved to shared/ so the report and its PDF say the same as the Results and Levers tabs.
export * from "../../shared/format/verdict";

// Moved to shared/ so the server's report and PDF format numbers exactly as the screen does.
export * from "../../shared/format/number-format";

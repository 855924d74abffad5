// Moved to shared/ so the Study zip made on the server escapes CSV cells exactly as the browser's downloads do.
export * from "../../shared/export/csv";

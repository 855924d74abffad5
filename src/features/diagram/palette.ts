// Moved to shared/ so the report's figures use the same colours as the screen.
export * from "../../../shared/diagram/palette";

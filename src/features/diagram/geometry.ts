// Moved to shared/ so the report draws the diagram on the server with the same geometry as the screen.
export * from "../../../shared/diagram/geometry";

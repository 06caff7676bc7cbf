package reach

// Caution is the short safety statement that every output of the project
// carries: terminal text, GeoJSON, JSON, maps and reports.
const Caution = "PLANNING AID ONLY - NOT FOR NAVIGATION. Real glide performance depends on " +
	"configuration, propeller, pilot technique, turbulence and sinking air. Check every figure " +
	"against the aircraft's flight manual; local regulations and licensed instruction decide."

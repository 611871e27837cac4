// Exposure times as photographers write them: the rules live in lib so the server's CSV import reads them the same way.
export { formatExposure, formatExposureValue, parseExposure } from "@/lib/bracket-sets/exposure-text";

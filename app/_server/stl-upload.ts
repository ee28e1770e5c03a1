// Shared by every STL upload (a part's geometry, a quote line's model); the body itself is
// spooled to disk by spool-upload.ts.

// Browsers and CAD tools label STL files in many ways; none of these can carry anything else.
export const STL_TYPES = new Set(["", "application/octet-stream", "model/stl", "model/x.stl-binary", "model/x.stl-ascii", "application/sla", "application/vnd.ms-pki.stl", "text/plain"]);

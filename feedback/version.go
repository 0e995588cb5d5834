package feedback

// Version is the ejecta library version (semantic versioning).
const Version = "0.1.0"

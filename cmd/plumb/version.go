package main

// version is plumb's version, written into every JSON result as
// "plumb_version". Bump it here, and only here, on a release.
const version = "0.1.0-dev"

package ground

// CheckProgram exposes checkProgram to the external tests of this package.
var CheckProgram = checkProgram

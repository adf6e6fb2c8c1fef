// Package device describes quantum devices and compiles circuits of package
// circuit to them.
package device

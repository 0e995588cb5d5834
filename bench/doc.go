// Package bench holds the standard gas set-ups and the runner that compares
// coupling schemes on the same gas.
package bench

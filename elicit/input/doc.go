// Package input is the one set of rules every typed value meets, whether
// it arrives through a web form, a command-line flag or an imported
// record: plain decimal numbers, whole numbers, text (valid UTF-8, no
// control characters but newline, carriage return and tab, length counted
// in characters) and every length limit. It does no I/O.
package input

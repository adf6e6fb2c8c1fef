// Package input defines how fringe reports bad user input: the spec, a data
// file, a flag, a data value or a parameter that does not fit the data.
//
// Every such error is an *Error (or wraps one) and satisfies
// errors.Is(err, ErrBad); the command exits with status 2 on them and with
// status 1 on any other failure. An Error names the file, the 1-based line
// and the spec key at fault where they are known, and its message is always
// one line (line breaks quoted from the user's input are escaped).
//
// Imports: the standard library only. It is the ground of the bench
// packages: every one of them may import it, and it imports none of them.
package input

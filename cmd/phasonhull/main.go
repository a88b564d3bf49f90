// Command phasonhull recovers the hull of a point pattern along a chain —
// its phason space — from the site positions, measures the effective step
// angle of the shift on it, and lists the gap labels the hull allows.
//
// Run "phasonhull --help" for the commands and "phasonhull COMMAND --help"
// for each one's flags and an example.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"runtime/debug"
)

// Exit statuses, documented in the README.
const (
	exitOK       = 0
	exitInternal = 1 // a bug: an unexpected error or a recovered panic
	exitInput    = 2 // bad input, bad flags, or a refused request
	exitFail     = 3 // an audit whose verdict is "fail"
)

func main() {
	outfile.ExitOnSignal(os.Stderr)
	code := run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	outfile.Hold() // no exit inside a commit of a file
	os.Exit(code)
}

// run executes one command line and returns the exit status. Any panic
// that escapes a command is turned into exitInternal with a bug-report
// hint (see guard), so no stack trace reaches a user unasked.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return guard(stderr, func() int { return execute(args, stdin, stdout, stderr) })
}

// guard calls f and returns its status; a panic in f becomes exitInternal
// with a bug-report hint on stderr, and the stack trace only when the
// environment sets PHASONHULL_TRACE.
func guard(stderr io.Writer, f func() int) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "phasonhull: internal error: %v\n", r)
			fmt.Fprintln(stderr, "This is a bug in phasonhull. Please report it with the command line and input file;")
			fmt.Fprintln(stderr, "set PHASONHULL_TRACE=1 to print the stack trace.")
			if os.Getenv("PHASONHULL_TRACE") != "" {
				stderr.Write(debug.Stack())
			}
			code = exitInternal
		}
	}()
	return f()
}

// execute runs one command line without the panic guard.
func execute(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	root := newRootCmd(stdin, stdout, stderr)
	outfile.Bind(root)
	bindTimeout(root)
	root.SetArgs(args)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	var ee *exitError
	if errors.As(err, &ee) {
		if ee.err != nil {
			fmt.Fprintf(stderr, "phasonhull: %v\n", ee.err)
		}
		return ee.code
	}
	// Errors from cobra itself (unknown flag, wrong argument count) and
	// from reading input are the user's to fix.
	fmt.Fprintf(stderr, "phasonhull: %v\n", err)
	return exitInput
}

// exitError carries an exit status other than exitInput up to run.
type exitError struct {
	code int
	err  error // printed when non-nil
}

func (e *exitError) Error() string {
	if e.err == nil {
		return fmt.Sprintf("exit status %d", e.code)
	}
	return e.err.Error()
}

func (e *exitError) Unwrap() error { return e.err }

// internalErr marks err as a failure of the program rather than the input.
func internalErr(err error) error { return &exitError{code: exitInternal, err: err} }

// Command kinword is Kinword's one binary: ingest intranet documents, search
// them as a viewer, evaluate ranking against judged queries, and (in later
// subcommands) mine term associations and serve suggestions.
//
// Exit codes: 0 ok, 1 runtime failure, 2 bad usage; the reason is one line
// on stderr.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"os"
	"os/signal"
	"sort"
	"strings"
	"syscall"
)

// usageError marks a bad command line (exit 2).
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, args ...any) error { return usageError{fmt.Sprintf(format, args...)} }

// command is one subcommand.
type command struct {
	name    string
	summary string
	usage   string // after "kinword NAME "
	run     func(ctx context.Context, e *env, args []string) error
}

var commands = map[string]*command{}

func register(c *command) { commands[c.name] = c }

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes one command line and returns the exit code.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		if len(args) > 1 {
			if _, ok := commands[args[1]]; ok {
				return run(ctx, []string{args[1], "--help"}, stdout, stderr)
			}
		}
		printOverview(stdout)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	c, ok := commands[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "kinword: unknown command %q (run 'kinword help' for the list)\n", args[0])
		return 2
	}
	e := &env{stdout: stdout, stderr: stderr, cmd: c}
	e.log = slog.New(slog.NewTextHandler(stderr, &slog.HandlerOptions{Level: slog.LevelWarn}))
	err := c.run(ctx, e, args[1:])
	switch {
	case err == nil:
		return 0
	case errors.Is(err, flag.ErrHelp):
		return 0
	case errors.As(err, new(usageError)):
		fmt.Fprintf(stderr, "kinword %s: %v (see 'kinword %s --help')\n", c.name, oneLine(err), c.name)
		return 2
	case errors.Is(err, context.Canceled):
		fmt.Fprintf(stderr, "kinword %s: interrupted; work done so far is kept\n", c.name)
		return 1
	default:
		fmt.Fprintf(stderr, "kinword %s: %v\n", c.name, oneLine(err))
		return 1
	}
}

func oneLine(err error) string { return strings.Join(strings.Fields(err.Error()), " ") }

func printOverview(w io.Writer) {
	fmt.Fprintln(w, "kinword: related-term suggestions beside an intranet search")
	fmt.Fprintln(w, "\nusage: kinword COMMAND [flags]   (kinword help COMMAND for details)")
	fmt.Fprintln(w, "\ncommands:")
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-9s %s\n", n, commands[n].summary)
	}
	fmt.Fprintln(w, "\nevery command takes --data DIR (default from the config file), --config FILE and --json")
}

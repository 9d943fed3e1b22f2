package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"os"

	"kinword/internal/access"
	"kinword/internal/config"
)

// env is what every command gets: output streams, the logger, and after
// parseFlags, the loaded configuration.
type env struct {
	stdout, stderr io.Writer
	log            *slog.Logger
	cfg            config.Config
	dataDir        string
	json           bool
	cmd            *command
}

// common holds the flags every command takes.
type common struct {
	data, config string
	json         bool
}

// newFlags returns a FlagSet with the common flags.
func newFlags(name string, out io.Writer) (*flag.FlagSet, *common) {
	fs := flag.NewFlagSet("kinword "+name, flag.ContinueOnError)
	fs.SetOutput(out)
	c := &common{}
	fs.StringVar(&c.data, "data", "", "folder holding the index, tables and store (default: data_dir from the config)")
	fs.StringVar(&c.config, "config", os.Getenv("KINWORD_CONFIG"), "configuration file (TOML; default: embedded defaults, or $KINWORD_CONFIG)")
	fs.BoolVar(&c.json, "json", false, "print machine-readable JSON instead of text")
	return fs, c
}

// parse parses args (flags may follow positional arguments), loads the
// configuration and fills e. It returns the positional arguments.
func (e *env) parse(fs *flag.FlagSet, c *common, args []string) ([]string, error) {
	fs.SetOutput(e.stderr)
	for _, a := range args {
		if a == "-h" || a == "-help" || a == "--help" {
			fs.SetOutput(e.stdout)
		}
	}
	fs.Usage = func() {
		out := fs.Output()
		fmt.Fprintf(out, "usage: kinword %s %s\n\n%s\n\nflags:\n", e.cmd.name, e.cmd.usage, e.cmd.summary)
		fs.PrintDefaults()
	}
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if err == flag.ErrHelp {
				return nil, err
			}
			return nil, usageError{err.Error()}
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	cfg, err := config.Load(c.config)
	if err != nil {
		return nil, err
	}
	e.cfg = cfg
	e.dataDir = cfg.DataDir
	if c.data != "" {
		e.dataDir = c.data
	}
	e.json = c.json
	return pos, nil
}

// printJSON writes v as indented JSON to stdout.
func (e *env) printJSON(v any) error {
	enc := json.NewEncoder(e.stdout)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// viewerFlag parses --viewer specs.
type viewerFlag struct{ v access.Viewer }

func (f *viewerFlag) String() string { return f.v.String() }
func (f *viewerFlag) Set(s string) error {
	v, err := access.ParseViewer(s)
	if err != nil {
		return err
	}
	f.v = v
	return nil
}

func errf(format string, args ...any) error { return fmt.Errorf(format, args...) }

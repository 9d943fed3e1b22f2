package main

import (
	"context"
	"fmt"
	"strings"

	"kinword/internal/config"
	"kinword/internal/web"
)

func init() {
	register(&command{name: "token", summary: "make an API token for the librarian or admin role: prints it once, with the hashed entry for the configuration",
		usage: "--role librarian|admin --name NAME", run: runToken})
}

// tokenOut is what kinword token --json prints.
type tokenOut struct {
	Name   string `json:"name"`
	Role   string `json:"role"`
	Token  string `json:"token"`
	SHA256 string `json:"sha256"`
	TOML   string `json:"toml"`
}

// runToken makes a random token and prints it with its [[server.tokens]]
// entry. Nothing is written anywhere: the token exists only in this output
// and, hashed, wherever the entry is pasted.
func runToken(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("token", e.stderr)
	role := fs.String("role", "", `role the token grants: "librarian" or "admin" (admin includes librarian)`)
	name := fs.String("name", "", "name shown in logs instead of the token (letters, digits, '.', '_', '-')")
	pos, err := e.parse(fs, c, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	if *role != "librarian" && *role != "admin" {
		return usagef("--role must be librarian or admin")
	}
	entry := config.Token{Name: *name, Role: *role, SHA256: strings.Repeat("0", 64)}
	if err := config.ValidateTokens([]config.Token{entry}); err != nil { // the name is all that is left to check
		return usagef("--name %q must be 1 to 64 letters, digits, '.', '_' or '-'", *name)
	}
	for _, t := range e.cfg.Server.Tokens {
		if t.Name == *name {
			fmt.Fprintf(e.stderr, "kinword token: the configuration already has a token named %q; replace its entry to rotate it\n", *name)
		}
	}
	token, sum, err := web.NewToken()
	if err != nil {
		return err
	}
	entry.SHA256 = sum
	block := tokenTOML(entry)
	if e.json {
		return e.printJSON(tokenOut{Name: entry.Name, Role: entry.Role, Token: token, SHA256: sum, TOML: block})
	}
	fmt.Fprintf(e.stdout, "token (shown only now; Kinword keeps just its hash):\n%s\n\n", token)
	fmt.Fprintf(e.stdout, "add to the configuration file, or to the file named by %s:\n%s", config.TokensFileEnv, block)
	return ctx.Err()
}

// tokenTOML renders a [[server.tokens]] entry.
func tokenTOML(t config.Token) string {
	return fmt.Sprintf("[[server.tokens]]\nname = %q\nrole = %q\nsha256 = %q\n", t.Name, t.Role, t.SHA256)
}

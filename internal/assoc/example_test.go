package assoc_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"kinword/internal/access"
	"kinword/internal/assoc"
)

func Example() {
	c := assoc.NewMemCorpus(nil)
	for i := range 12 {
		c.AddDoc(nil,
			strings.Fields(fmt.Sprintf("reservoir level sensor reading %d", i%3)),
			strings.Fields("pump station maintenance schedule"))
	}
	for range 4 { // restricted to the "ops" group
		c.AddDoc([]string{"ops"}, strings.Fields("pump station outage drill"))
	}
	tb, err := assoc.Mine(context.Background(), c, assoc.Options{MinPhraseCount: -1})
	if err != nil {
		fmt.Println(err)
		return
	}
	dir, _ := os.MkdirTemp("", "assoc-example")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "assoc.kwassoc")
	if err := tb.Write(path); err != nil {
		fmt.Println(err)
		return
	}
	tb, err = assoc.Load(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, v := range []access.Viewer{access.Anonymous, {Groups: []string{"ops"}}} {
		fmt.Printf("%s:", v)
		for _, n := range tb.Related(v, "pump", assoc.MeasureDice, 4) {
			fmt.Printf(" %s(%.2f %q)", n.Term, n.Dice, n.Scope)
		}
		fmt.Println()
	}
	// Dice for pump/drill in the ops scope: 2*4 / (16 + 4) = 0.40; for the
	// other neighbours the open scope's 1.00 beats the ops scope's 24/28.
	// Output:
	// anonymous: maintenance(1.00 "") schedule(1.00 "") station(1.00 "")
	// groups=ops: maintenance(1.00 "") schedule(1.00 "") station(1.00 "") drill(0.40 "ops")
}

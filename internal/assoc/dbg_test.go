package assoc

import (
	"bytes"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
	"time"
)

func TestDbgFuzz(t *testing.T) {
	tb := scopedTable(t)
	p := filepath.Join(t.TempDir(), "seed.kwassoc")
	tb.Write(p)
	good, _ := os.ReadFile(p)
	r := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 20000; i++ {
		d := bytes.Clone(good)
		switch r.IntN(3) {
		case 0:
			d[r.IntN(len(d))] ^= byte(1 + r.IntN(255))
		case 1:
			d = d[:r.IntN(len(d))]
		case 2:
			d = append(d, byte(r.IntN(256)))
		}
		st := time.Now()
		exercise(t, d)
		if time.Since(st) > 100*time.Millisecond {
			t.Fatalf("slow %d", i)
		}
	}
}

package access

import (
	"errors"
	"reflect"
	"testing"
)

func TestParseViewer(t *testing.T) {
	cases := []struct {
		name, in string
		want     Viewer
		err      bool
	}{
		{"anonymous word", "anonymous", Anonymous, false},
		{"empty", "", Anonymous, false},
		{"department and groups", "dept=Ops,groups=staff+It-Security", Viewer{Department: "ops", Groups: []string{"it-security", "staff"}}, false},
		{"groups as a comma continuation", "dept=ops,groups=staff,executive", Viewer{Department: "ops", Groups: []string{"executive", "staff"}}, false},
		{"duplicates collapse", "groups=a|a+b", Viewer{Groups: []string{"a", "b"}}, false},
		{"unknown key", "colour=red", Viewer{}, true},
		{"bare word", "ops", Viewer{}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := ParseViewer(c.in)
			if c.err {
				if !errors.Is(err, ErrBadViewer) {
					t.Fatalf("err = %v, want ErrBadViewer", err)
				}
				return
			}
			if err != nil || !reflect.DeepEqual(got, c.want) {
				t.Errorf("ParseViewer(%q) = %+v, %v; want %+v", c.in, got, err, c.want)
			}
			if again, _ := ParseViewer(got.String()); !reflect.DeepEqual(again, got) && got.String() != "anonymous" {
				t.Errorf("String does not round-trip: %q -> %+v", got.String(), again)
			}
		})
	}
}

func TestCanRead(t *testing.T) {
	v := Viewer{Groups: []string{"executive", "staff"}}
	cases := []struct {
		name   string
		groups []string
		want   bool
	}{
		{"open document", nil, true},
		{"shared group", []string{"legal-privileged", "executive"}, true},
		{"no shared group", []string{"legal-privileged"}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := v.CanRead(c.groups); got != c.want {
				t.Errorf("CanRead(%v) = %v", c.groups, got)
			}
		})
	}
	if Anonymous.CanRead([]string{"staff"}) {
		t.Error("anonymous reads a restricted document")
	}
}

func FuzzParseViewer(f *testing.F) {
	for _, s := range []string{"dept=ops,groups=a+b", "groups=,,,", "=", "dept==x", "anonymous"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseViewer(s)
		if err != nil {
			return
		}
		if n := v.Normalize(); !reflect.DeepEqual(n, v) {
			t.Fatalf("parsed viewer not normalised: %+v", v)
		}
	})
}

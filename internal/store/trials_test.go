package store

import (
	"context"
	"encoding/json"
	"errors"
	"strings"
	"testing"
	"time"
)

func TestTrialsSaveListGet(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			t0 := time.Date(2026, 11, 30, 9, 0, 0, 123, time.UTC)
			id1, err := s.SaveTrial(ctx, Trial{Created: t0, Actor: "ops", Title: "pin leak", Report: json.RawMessage(`{"a":1}`)})
			if err != nil {
				t.Fatal(err)
			}
			id2, err := s.SaveTrial(ctx, Trial{ID: "tfixed", Created: t0.Add(time.Hour), Actor: "demo", Title: "block x", Report: json.RawMessage(`{"b":[2]}`)})
			if err != nil || id2 != "tfixed" || !strings.HasPrefix(id1, "t") || len(id1) != 13 {
				t.Fatalf("ids %q %q, %v", id1, id2, err)
			}
			list, err := s.Trials(ctx, 0)
			if err != nil || len(list) != 2 || list[0].ID != id2 || list[1].ID != id1 || list[0].Report != nil {
				t.Fatalf("list %+v, %v; want newest first without reports", list, err)
			}
			got, err := s.Trial(ctx, id1)
			if err != nil || !got.Created.Equal(t0) || got.Actor != "ops" || got.Title != "pin leak" || string(got.Report) != `{"a":1}` {
				t.Fatalf("get %+v, %v", got, err)
			}
			if _, err := s.Trial(ctx, "tnone"); !errors.Is(err, ErrTrialNotFound) {
				t.Errorf("unknown id: %v, want ErrTrialNotFound", err)
			}
			if _, err := s.SaveTrial(ctx, Trial{ID: "tfixed", Report: json.RawMessage(`{}`)}); !errors.Is(err, ErrConflict) {
				t.Errorf("repeated id: %v, want ErrConflict", err)
			}
			bad := []Trial{
				{Report: json.RawMessage(`{`)},
				{Report: nil},
				{Title: strings.Repeat("x", MaxRuleFieldBytes+1), Report: json.RawMessage(`{}`)},
				{Actor: "a\x00b", Report: json.RawMessage(`{}`)},
			}
			for i, tr := range bad {
				if _, err := s.SaveTrial(ctx, tr); !errors.Is(err, ErrInvalid) {
					t.Errorf("bad trial %d: %v, want ErrInvalid", i, err)
				}
			}
			if list, _ := s.Trials(ctx, 1); len(list) != 1 {
				t.Errorf("limit 1 listed %d", len(list))
			}
		})
	}
}

package inputerr

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"testing"
)

func TestErrorShape(t *testing.T) {
	// The shapes are probity's own convention (common practice, no source).
	for _, c := range []struct {
		e    *Error
		want string
	}{
		{&Error{File: "labels.csv", Line: 5, Field: "label", Msg: `label "x" is not a class`}, `labels.csv line 5, field label: label "x" is not a class`},
		{&Error{File: "labels.csv", Line: 5, Msg: "3 fields"}, "labels.csv line 5: 3 fields"},
		{&Error{File: "manifest.json", Field: "double", Msg: "600: must be between 0 and 581"}, "manifest.json, field double: 600: must be between 0 and 581"},
		{&Error{File: "plan.yaml", Msg: "invalid plan file"}, "plan.yaml: invalid plan file"},
		{&Error{Field: "double", Msg: "600: must be between 0 and 581"}, "double 600: must be between 0 and 581"},
		{&Error{Field: "--double", Msg: "600: must be between 0 and 581"}, "--double 600: must be between 0 and 581"},
		{&Error{Msg: "--plan is required"}, "--plan is required"},
		{&Error{Line: 3, Field: "x", Msg: "bad"}, "line 3, field x: bad"},
	} {
		if got := c.e.Error(); got != c.want {
			t.Errorf("%#v: got %q, want %q", c.e, got, c.want)
		}
	}
}

func TestCauseAndHint(t *testing.T) {
	sentinel := errors.New("invalid thing")
	e := At("a.csv", 2, "k", "%w: value %d", sentinel, 7).WithHint("fix it")
	if e.Error() != "a.csv line 2, field k: invalid thing: value 7" || !errors.Is(e, sentinel) || e.Hint != "fix it" {
		t.Fatalf("At: %q %v %q", e.Error(), errors.Is(e, sentinel), e.Hint)
	}
	wrapped := fmt.Errorf("reading: %w", e)
	if got, ok := As(wrapped); !ok || got != e || HintOf(wrapped) != "fix it" {
		t.Fatalf("As/HintOf through a wrapper: %v %v %q", got, ok, HintOf(wrapped))
	}
	// SetHint copies an *Error, wraps a chain that holds one, and leaves
	// anything else alone.
	h := SetHint(e, "other")
	if h.(*Error).Hint != "other" || e.Hint != "fix it" {
		t.Errorf("SetHint changed the original or did not set: %q %q", h.(*Error).Hint, e.Hint)
	}
	h = SetHint(wrapped, "outer")
	if HintOf(h) != "outer" || h.Error() != wrapped.Error() || !errors.Is(h, sentinel) {
		t.Errorf("SetHint on a chain: %q %q", HintOf(h), h.Error())
	}
	plain := errors.New("disk on fire")
	if SetHint(plain, "x") != plain || Is(plain) {
		t.Error("SetHint turned a plain error into an input error")
	}
	two := Errorf("%w and %w", sentinel, fs.ErrNotExist)
	if !errors.Is(two, sentinel) || !errors.Is(two, fs.ErrNotExist) {
		t.Error("two %w verbs: a cause is lost")
	}
}

func TestFromPath(t *testing.T) {
	missing := filepath.Join(t.TempDir(), "nope.csv")
	_, err := os.ReadFile(missing)
	e, ok := As(FromPath(err))
	if !ok || e.File != missing || e.Hint != "check the path" || !errors.Is(e, fs.ErrNotExist) {
		t.Fatalf("FromPath: %#v", e)
	}
	if e.Error() != missing+": no such file or directory" {
		t.Errorf("FromPath renders %q", e.Error())
	}
	if FromPath(nil) != nil {
		t.Error("FromPath(nil) is not nil")
	}
	other := errors.New("x")
	if FromPath(other) != other {
		t.Error("FromPath changed an error that is not a path error")
	}
}

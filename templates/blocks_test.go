package templates

import (
	"reflect"
	"testing"
)

func TestBlocks(t *testing.T) {
	in := "First line\n  continues here.\n\n- one\n  more of one\n- two\n\nLast.\r\n"
	want := []Block{
		{Text: "First line continues here."},
		{Bullet: true, Text: "one more of one"},
		{Bullet: true, Text: "two"},
		{Text: "Last."},
	}
	if got := Blocks(in); !reflect.DeepEqual(got, want) {
		t.Errorf("Blocks = %#v\nwant %#v", got, want)
	}
	if got := Blocks(" \n\n-\n"); len(got) != 0 {
		t.Errorf("blank input gave %#v", got)
	}
}

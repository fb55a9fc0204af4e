package templates

import "strings"

// Block is one paragraph or bullet item of a wording file.
type Block struct {
	// Bullet is true for an item of a bulleted list.
	Bullet bool
	// Text is the block's text with its lines joined by single spaces.
	Text string
}

// Blocks splits wording text into paragraphs and bullet items (see the
// package documentation for the format). Leading and trailing space on
// each line is dropped; empty blocks are dropped.
func Blocks(text string) []Block {
	var out []Block
	var cur *Block
	var words []string
	flush := func() {
		if cur != nil && len(words) > 0 {
			cur.Text = strings.Join(words, " ")
			out = append(out, *cur)
		}
		cur, words = nil, nil
	}
	for _, line := range strings.Split(strings.ReplaceAll(text, "\r\n", "\n"), "\n") {
		t := strings.TrimSpace(line)
		switch {
		case t == "":
			flush()
		case t == "-" || strings.HasPrefix(t, "- "):
			flush()
			cur = &Block{Bullet: true}
			if rest := strings.TrimSpace(strings.TrimPrefix(t, "-")); rest != "" {
				words = append(words, rest)
			}
		default:
			if cur == nil {
				cur = &Block{}
			}
			words = append(words, t)
		}
	}
	flush()
	return out
}

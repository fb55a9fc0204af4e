package labeltrail

import (
	"errors"
	"fmt"
	"time"

	"probity/sampling/safewrite"
)

// Log is an open trail that label events are appended to. It is not safe
// for concurrent use: the caller serialises Append (one labeling server
// serves every labeler of a draw, and the file's lock keeps a second
// process out).
type Log struct {
	file  *safewrite.AppendLog
	state *State
	path  string
	last  string
	seq   int
	// broken is the failure of an append that may have left part of a
	// line: nothing more is appended after it.
	broken error
}

// Create begins a new trail at path for d, at time now, and opens it. The
// file must not exist.
func Create(path string, d Draw, now time.Time) (*Log, error) {
	now = now.UTC().Truncate(time.Millisecond)
	b := d.BeginEntry()
	e := Entry{Seq: 1, Time: FormatTime(now), Begin: &b}
	line, err := encode(&e)
	if err != nil {
		return nil, err
	}
	f, err := safewrite.CreateAppendLog(path, append(line, '\n'))
	if err != nil {
		return nil, err
	}
	return &Log{file: f, state: newState(d, path, now), path: path, last: lineHash(line), seq: 1}, nil
}

// Open opens the existing trail at path to go on labeling: it is parsed
// and replayed against d (Parse, Replay). A last line cut short is refused
// (ErrCutShort) unless dropCutShort, which removes it — it was never
// confirmed — and returns its bytes as dropped.
func Open(path string, d Draw, dropCutShort bool) (l *Log, dropped []byte, err error) {
	f, err := safewrite.OpenAppendLog(path)
	if err != nil {
		return nil, nil, err
	}
	defer func() {
		if err != nil {
			f.Close()
		}
	}()
	// Read under the lock: no other process appends meanwhile.
	t, perr := Read(path)
	if perr != nil && !(dropCutShort && errors.Is(perr, ErrCutShort) && t != nil) {
		return nil, nil, perr
	}
	s, err := Replay(t, d)
	if err != nil {
		return nil, nil, err
	}
	if perr != nil {
		data, _ := readTail(path, t.Whole)
		dropped = data
		if err := f.CutTail(t.Whole); err != nil {
			return nil, nil, err
		}
	}
	return &Log{file: f, state: s, path: path, last: t.last, seq: len(t.Entries)}, dropped, nil
}

// State is the labeling the trail has reached. It changes with every
// Append; the caller reads it under the lock it appends under.
func (l *Log) State() *State { return l.state }

// Path is the trail's file.
func (l *Log) Path() string { return l.path }

// Append checks ev against the state at time now (State.Check), appends
// it as the next line and flushes the file to disk; only then is the
// state updated and the entry returned. A refused event (an
// *inputerr.Error; ErrConflict when the item changed meanwhile) writes
// nothing.
func (l *Log) Append(now time.Time, ev Label) (Entry, error) {
	if l.broken != nil {
		return Entry{}, fmt.Errorf("labeltrail: the trail %s cannot take more events after a failed write: %w", l.path, l.broken)
	}
	now = now.UTC().Truncate(time.Millisecond)
	line := l.seq + 1
	if err := l.state.Check(line, now, ev); err != nil {
		return Entry{}, err
	}
	e := Entry{Seq: line, Prev: l.last, Time: FormatTime(now), Label: &ev}
	text, err := encode(&e)
	if err != nil {
		return Entry{}, err
	}
	if err := l.file.Append(append(text, '\n')); err != nil {
		l.broken = err
		return Entry{}, err
	}
	if err := l.state.apply(line, now, ev); err != nil {
		return Entry{}, fmt.Errorf("labeltrail: line %d was checked but not applied: %w", line, err)
	}
	l.seq, l.last = line, lineHash(text)
	return e, nil
}

// Close closes the file.
func (l *Log) Close() error { return l.file.Close() }

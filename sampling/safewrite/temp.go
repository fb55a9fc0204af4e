package safewrite

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
)

// TempPrefix begins the name of every temporary file or folder the package
// makes. The full name is TempPrefix, the writing process's id, a random
// part and the final name: ".probity-tmp-4711-2049384756-worksheet.csv".
// A process killed outright (SIGKILL, a power cut) cannot remove its
// temporaries; the id lets a later run tell them from the temporaries of a
// run still writing.
const TempPrefix = ".probity-tmp-"

// tempName matches a temporary's name: the process id and the final name.
var tempName = regexp.MustCompile(`^\.probity-tmp-([0-9]+)-[0-9]+-(.+)$`)

// olderTempName matches the temporaries of probity versions before this
// package: ".worksheet.csv.tmp-123", ".record.tmp-123", ".plan-123.tmp",
// ".tmp-signoff.yaml-123", ".trend.png.123.tmp".
var olderTempName = regexp.MustCompile(`^\.(.+\.tmp-[0-9]+|plan-[0-9]+\.tmp|tmp-.+-[0-9]+|.+\.[0-9]+\.tmp)$`)

// tempPattern is the os.CreateTemp / os.MkdirTemp pattern for name.
func tempPattern(name string) string {
	return TempPrefix + strconv.Itoa(os.Getpid()) + "-*-" + name
}

// Leftover is a temporary file or folder found where a write was to go.
type Leftover struct {
	// Path is the temporary's path.
	Path string
	// PID is the id of the process that made it; 0 for a temporary of an
	// older probity, which did not record it.
	PID int
	// Running is true when a process with that id is running: a write may
	// still be in progress (or the id has been reused).
	Running bool
}

// String says what the leftover is, for a message.
func (l Leftover) String() string {
	switch {
	case l.PID == 0:
		return fmt.Sprintf("%s, which looks like a temporary file an earlier probity version left when it was stopped while writing", l.Path)
	case l.Running:
		return fmt.Sprintf("%s, a temporary file of probity process %d, which is still running (or its id was reused)", l.Path, l.PID)
	}
	return fmt.Sprintf("%s, a temporary file of probity process %d, which is no longer running", l.Path, l.PID)
}

// sweep removes from dir the temporaries of probity processes that are no
// longer running (killed before they could clean up), and returns the
// temporaries it leaves: those of running processes and those of older
// versions, whose writer is unknown.
func sweep(dir string) []Leftover {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var left []Leftover
	for _, e := range entries {
		name := e.Name()
		if !strings.HasPrefix(name, ".") {
			continue
		}
		path := filepath.Join(dir, name)
		if m := tempName.FindStringSubmatch(name); m != nil {
			pid, err := strconv.Atoi(m[1])
			if err != nil || pid <= 0 {
				continue
			}
			if pid == os.Getpid() || running(pid) {
				left = append(left, Leftover{Path: path, PID: pid, Running: true})
				continue
			}
			if err := locked(func() error { return os.RemoveAll(path) }); err != nil {
				left = append(left, Leftover{Path: path, PID: pid})
			}
			continue
		}
		if olderTempName.MatchString(name) {
			left = append(left, Leftover{Path: path})
		}
	}
	return left
}

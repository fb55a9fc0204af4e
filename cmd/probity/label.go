package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"strconv"
	"time"

	"github.com/spf13/cobra"

	"probity/plan/inputerr"
	"probity/plan/planfile"
	"probity/sampling/drawfolder"
	"probity/sampling/labelserver"
	"probity/sampling/labeltrail"
	"probity/sampling/safewrite"
)

// labelOptions are the flags of probity label.
type labelOptions struct {
	drawDir        string
	planPath       string
	media          string
	port           int
	bind           string
	dropIncomplete bool
}

// loopback is the address probity label serves on unless told otherwise.
const loopback = "127.0.0.1"

// newLabelCommand builds `probity label`.
func newLabelCommand(d deps) *cobra.Command {
	opts := &labelOptions{}
	cmd := &cobra.Command{
		Use:   "label DRAWDIR --plan PLAN.yaml [--media DIR] [--port N]",
		Short: "Serve a blind labeling page for a draw, with an audit trail of every label",
		Long: `label serves the draw's labeling page on this machine (127.0.0.1, a free
port unless --port) and prints its address, which carries a random access
token: open it in a browser, give your name once, and label the items one
at a time in worksheet order with the keyboard — 1, 2, … for the plan's
classes, u for unsure, n for a note, ← and → to move. The page shows only the
columns the draw chose to show (an image file named in one, under --media
DIR, is shown as the image) and the count of items labeled: never a
prediction, a score, a stratum, a weight or an error count.

An item marked unsure is replaced by the spare the draw's rule assigns to
it, which the page offers next. A draw made with --double k has a second
address, for the second labeler, who labels the doubled items without
seeing the first labels. Several labelers may label at once.

Every label, note and correction (a changed label needs a reason) is
appended to the draw folder's audit trail, label-trail.jsonl — labeler, UTC
time, item, previous and new value, note, reason, and the SHA-256 of the line
before — and written to disk before the page confirms it. Stopping the
server, or a crash, loses nothing confirmed: run label again to go on where
labeling stopped. Pass the trail to record with --trail.

A last line cut short by a crash (never confirmed) is refused until label
starts again with --drop-incomplete, which removes it.

The server answers only on the loopback interface. --bind ADDR serves on
another address of this machine, reachable from other machines: anyone who
has the printed address with its token can then label.

` + exitCodesHelp + `

label runs until stopped with Ctrl-C (exit 130) or SIGTERM (143); every
confirmed label is then on disk. It exits 2 on bad input, before serving.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 1 {
				return inputerr.Errorf("label needs exactly one draw folder, got %d arguments", len(args)).WithHint("probity label DRAWDIR --plan PLAN.yaml")
			}
			return nil
		},
		PreRunE: func(cmd *cobra.Command, args []string) error {
			opts.drawDir = args[0]
			return opts.validate()
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			return runLabel(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.planPath, "plan", "", "the plan file the sample was drawn from (its classes are the labels)")
	fl.StringVar(&opts.media, "media", "", "folder of the image files a shown column names (read only; nothing outside it is served)")
	fl.IntVar(&opts.port, "port", 0, "the port to serve on (default: a free port)")
	fl.StringVar(&opts.bind, "bind", loopback, "the address to serve on; any other than the loopback interface is reachable from other machines")
	fl.BoolVar(&opts.dropIncomplete, "drop-incomplete", false, "remove a last trail line cut short by a crash (it was never confirmed)")
	return cmd
}

// validate checks the flags that need no file.
func (o *labelOptions) validate() error {
	if o.planPath == "" {
		return inputerr.Errorf("--plan is required").WithHint("pass the plan file the sample was drawn from")
	}
	if o.port < 0 || o.port > 65535 {
		return inputerr.Errorf("--port %d is not a port number (0 to 65535; 0 picks a free one)", o.port)
	}
	if net.ParseIP(o.bind) == nil {
		return inputerr.Errorf("--bind %q is not an IP address", o.bind).WithHint("for example --bind 127.0.0.1 (the default) or --bind 192.0.2.10")
	}
	if o.media != "" {
		if st, err := os.Stat(o.media); err != nil || !st.IsDir() {
			return inputerr.Errorf("--media %s is not a folder", o.media).WithHint("pass the folder that holds the image files the worksheet names")
		}
	}
	return nil
}

// labeling is a draw folder opened for labeling: its trail, open for
// appending, and the server of its page.
type labeling struct {
	folder *drawfolder.Folder
	trail  *labeltrail.Log
	server *labelserver.Server
	// created is set when the trail was begun now; dropped holds the
	// bytes of a cut-short last line that was removed.
	created bool
	dropped []byte
}

// labelSetup is what openLabeling needs.
type labelSetup struct {
	planPath, drawDir, media string
	dropIncomplete           bool
	hosts                    []string
	now                      func() time.Time
	random                   io.Reader
}

// openLabeling opens the draw folder against the plan (drawfolder.Open),
// begins its trail or opens the one it has (replayed against the draw),
// and builds the server. The label command and the demo both label
// through it.
func openLabeling(s labelSetup) (*labeling, error) {
	p, fp, err := planfile.LoadForJudging(s.planPath)
	if err != nil {
		return nil, err
	}
	f, err := drawfolder.Open(s.drawDir, fp, p.CandidateNames())
	if err != nil {
		return nil, err
	}
	d, err := labeltrail.DrawOf(f, p.Classes)
	if err != nil {
		return nil, err
	}
	l := &labeling{folder: f}
	path := f.Path(labeltrail.FileName)
	if _, err := os.Lstat(path); errors.Is(err, os.ErrNotExist) {
		l.trail, err = labeltrail.Create(path, d, s.now())
		l.created = true
		if err != nil {
			return nil, err
		}
	} else {
		l.trail, l.dropped, err = labeltrail.Open(path, d, s.dropIncomplete)
		if errors.Is(err, labeltrail.ErrCutShort) {
			return nil, inputerr.SetHint(err, "run probity label again with --drop-incomplete to remove it; every confirmed label is in the lines before it")
		}
		if errors.Is(err, safewrite.ErrLocked) {
			return nil, inputerr.SetHint(err, "another probity label serves this draw: label at the addresses it printed, or stop it first")
		}
		if errors.Is(err, labeltrail.ErrBroken) {
			return nil, inputerr.SetHint(err, "the trail was edited after labeling; restore the trail as probity label wrote it")
		}
		if err != nil {
			return nil, err
		}
	}
	l.server, err = labelserver.New(labelserver.Config{Folder: f, Classes: p.Classes, Trail: l.trail, Media: s.media,
		Hosts: s.hosts, Now: s.now, Random: s.random})
	if err != nil {
		l.trail.Close()
		return nil, err
	}
	return l, nil
}

// Close closes the server's media folder and the trail.
func (l *labeling) Close() error {
	return errors.Join(l.server.Close(), l.trail.Close())
}

func runLabel(d deps, o *labelOptions) error {
	ln, err := net.Listen("tcp", net.JoinHostPort(o.bind, strconv.Itoa(o.port)))
	if err != nil {
		return inputerr.Errorf("cannot serve on %s port %d: %v", o.bind, o.port, errors.Unwrap(err)).
			WithHint("pick another --port, or leave it out for a free one").Wrap(err)
	}
	defer ln.Close()
	port := ln.Addr().(*net.TCPAddr).Port
	// The Host header must name the address served (a page of another
	// site cannot reach the server through a name it controls), except
	// on every interface at once, where any may.
	host, ip := o.bind, net.ParseIP(o.bind)
	var hosts []string
	if ip.IsUnspecified() {
		host = loopback
	} else {
		hosts = []string{net.JoinHostPort(o.bind, strconv.Itoa(port))}
		if ip.IsLoopback() {
			hosts = append(hosts, net.JoinHostPort("localhost", strconv.Itoa(port)))
		}
	}
	l, err := openLabeling(labelSetup{planPath: o.planPath, drawDir: o.drawDir, media: o.media, dropIncomplete: o.dropIncomplete,
		hosts: hosts, now: d.now, random: d.random})
	if err != nil {
		return err
	}
	defer l.Close()
	if !ip.IsLoopback() {
		fmt.Fprintf(d.stderr, "probity: warning: serving on %s, reachable from other machines: anyone who has a printed address (it carries the access token) can label, and the page travels unencrypted\n", o.bind)
	}
	if l.dropped != nil {
		fmt.Fprintf(d.stderr, "probity: warning: removed the last line of %s, cut short when labeling stopped (%d bytes, never confirmed)\n", l.trail.Path(), len(l.dropped))
	}
	writeLabelBanner(d.stdout, o, l, host, port)
	srv := &http.Server{Handler: l.server.Handler(), ReadHeaderTimeout: 10 * time.Second, ReadTimeout: time.Minute, IdleTimeout: 2 * time.Minute}
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	select {
	case err := <-served:
		return fmt.Errorf("serving the labeling page: %w", err)
	case <-d.stop:
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		srv.Shutdown(ctx)
		sum := l.trail.State().Summary()
		fmt.Fprintf(d.stdout, "stopped: %d label events in %s\n", sum.Events, l.trail.Path())
		return nil
	}
}

// writeLabelBanner prints what is served and where.
func writeLabelBanner(w io.Writer, o *labelOptions, l *labeling, host string, port int) {
	sum := l.trail.State().Summary()
	state := fmt.Sprintf("%d label events so far", sum.Events)
	if l.created {
		state = "begun now"
	}
	fmt.Fprintf(w, "labeling %s (plan %s); trail %s, %s\n", o.drawDir, o.planPath, l.trail.Path(), state)
	for _, sh := range l.server.Sheets() {
		// the address on a line of its own: it stays whole in a
		// 100-column console
		fmt.Fprintf(w, "  %s (%s, %d items):\n    http://%s%s\n", sh.Title, sh.Name, sh.Items, net.JoinHostPort(host, strconv.Itoa(port)), sh.Path)
	}
	if len(l.server.Sheets()) > 1 {
		fmt.Fprintf(w, "give the second address only to the second labeler: the labels of one worksheet never show on the other\n")
	}
	fmt.Fprintf(w, "each address carries its access token: share it only with the labelers; stop with Ctrl-C (every confirmed label is on disk)\n")
}

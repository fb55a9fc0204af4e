package agreement

import (
	"bytes"
	"reflect"
	"testing"

	"probity/plan/record"
)

// TestLabelQualityEncodesCanonically puts a Resolve summary in a record and
// checks record.json round-trips byte for byte with the label_quality key.
func TestLabelQualityEncodesCanonically(t *testing.T) {
	for _, allow := range []bool{false, true} {
		f := newFixture()
		if allow {
			f.in.Adjudications, f.in.AdjudicationFile, f.in.AllowUnadjudicated = nil, "", true
		}
		res, err := Resolve(f.in)
		if err != nil {
			t.Fatal(err)
		}
		q := res.Quality
		q.UnsureTreatment = UnsureTreatment(q.Unsure, 0, true)
		data, err := record.Encode(&record.Record{LabelQuality: &q})
		if err != nil {
			t.Fatal(err)
		}
		i := bytes.Index(data, []byte(`"label_quality": {`))
		if i < 0 || bytes.Contains(data[i:], []byte("null")) {
			t.Errorf("record.json lacks label_quality or holds null in it:\n%s", data)
		}
		if !record.IsCanonical(data) {
			t.Errorf("record.json with label_quality is not canonical")
		}
		back, err := record.Decode(data)
		if err != nil {
			t.Fatal(err)
		}
		// Floats are written with 15 significant digits, so compare the
		// non-float parts exactly and the floats to that precision.
		bq := *back.LabelQuality
		if !reflect.DeepEqual(bq.Disagreements, q.Disagreements) || !reflect.DeepEqual(bq.Table, q.Table) ||
			!reflect.DeepEqual(bq.Labelers, q.Labelers) || !reflect.DeepEqual(bq.Warnings, q.Warnings) || bq.Note != q.Note {
			t.Errorf("decoded label_quality differs:\n got %+v\nwant %+v", bq, q)
		}
		if !near(bq.Kappa.StdErr, q.Kappa.StdErr, 1e-14) || !near(bq.AC1.Value, q.AC1.Value, 1e-14) {
			t.Errorf("decoded coefficients differ: %+v %+v", bq.Kappa, bq.AC1)
		}
	}
	// Without a second worksheet the key is absent.
	data, err := record.Encode(&record.Record{})
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Contains(data, []byte("label_quality")) {
		t.Error("record.json without double labeling has a label_quality key")
	}
}

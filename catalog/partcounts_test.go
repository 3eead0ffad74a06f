package catalog

import (
	"context"
	"reflect"
	"testing"
)

// PartCounts gives the same part counts as Stats, without the rest.
func TestPartCountsMatchStats(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	st, err := s.Stats(ctx)
	if err != nil {
		t.Fatal(err)
	}
	pc, err := s.PartCounts(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if pc.Parts != st.Parts || !reflect.DeepEqual(pc.ByKind, st.ByKind) || !reflect.DeepEqual(pc.ByType, st.ByType) {
		t.Errorf("PartCounts = %d %v %v, Stats = %d %v %v", pc.Parts, pc.ByKind, pc.ByType, st.Parts, st.ByKind, st.ByType)
	}
	if pc.Parts == 0 {
		t.Error("sample store counted no parts")
	}
}

package ground

import (
	"context"
	"os"
	"testing"
)

func TestDebugDump(t *testing.T) {
	src := os.Getenv("TRL")
	if src == "" {
		t.Skip()
	}
	p, rep, err := Ground(context.Background(), "x.trl", []byte(src), Options{})
	if err != nil {
		t.Fatal(err)
	}
	p.Dump(os.Stdout)
	t.Logf("%+v", rep)
}

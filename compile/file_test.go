package compile

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"flag"
	"hash/crc32"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"
)

var update = flag.Bool("update", false, "rewrite the circuit files in testdata/circuit")

// smallCircuit compiles the 4-queens CNF and attaches some metadata.
func smallCircuit(t testing.TB) *Circuit {
	t.Helper()
	c, _, err := Compile(context.Background(), queensCNF(4), Options{})
	if err != nil {
		t.Fatal(err)
	}
	c.Meta = Meta{
		Atoms:   []NamedVar{{"queen(1,2)", 2}, {"queen(2,4)", 8}, {`label("é")`, 16}},
		Shown:   []int32{0, 1},
		Weights: []VarWeight{{2, 5, 1}, {8, -3, 0}, {16, 1 << 40, 2}},
	}
	return c
}

func encoded(t testing.TB, c *Circuit) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := Encode(&buf, c); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// withChecksum replaces the checksum of a file by a correct one, so that a
// test reaches the checks behind it.
func withChecksum(b []byte) []byte {
	b = bytes.Clone(b)
	body := b[:len(b)-4]
	binary.LittleEndian.PutUint32(b[len(b)-4:], crc32.ChecksumIEEE(body))
	return b
}

// TestGoldenFile checks that the circuit file of the 4-queens circuit in
// testdata still decodes to the same circuit and that encoding it gives the
// same bytes, so the format does not change by accident.
func TestGoldenFile(t *testing.T) {
	path := filepath.Join("testdata", "circuit", "queens4.trlc")
	c := smallCircuit(t)
	if *update {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := Save(path, c); err != nil {
			t.Fatal(err)
		}
	}
	got := loadSame(t, path, c)
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(data, encoded(t, c)) {
		t.Errorf("encoding changed: %s no longer matches Encode", path)
	}
	if n := Count(got); n.Int64() != 2 { // OEIS A000170: 2 solutions for n = 4
		t.Errorf("Count = %v, want 2", n)
	}
}

// loadSame loads the circuit file at path and checks that it equals c.
func loadSame(t *testing.T, path string, c *Circuit) *Circuit {
	t.Helper()
	got, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(c, got, cmpopts.EquateEmpty()); diff != "" {
		t.Errorf("%s loads as a different circuit (-want +got):\n%s", path, diff)
	}
	return got
}

func TestSaveLoad(t *testing.T) {
	c := smallCircuit(t)
	dir := t.TempDir()
	path := filepath.Join(dir, "model.trlc")
	if err := Save(path, c); err != nil {
		t.Fatal(err)
	}
	// Saving again replaces the file.
	if err := Save(path, c); err != nil {
		t.Fatal(err)
	}
	loadSame(t, path, c)
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) != 1 {
		t.Errorf("directory holds %d files after Save, want 1 (no temporary file left)", len(entries))
	}
	if fi, err := os.Stat(path); err != nil || fi.Mode().Perm()&0o044 == 0 {
		t.Errorf("saved file is not readable by others: %v %v", fi.Mode(), err)
	}
	if err := Save(filepath.Join(dir, "missing", "x.trlc"), c); err == nil {
		t.Errorf("Save into a missing directory succeeded")
	}
	if _, err := Load(filepath.Join(dir, "missing.trlc")); err == nil {
		t.Errorf("Load of a missing file succeeded")
	}
}

func TestDecodeErrors(t *testing.T) {
	good := encoded(t, smallCircuit(t))
	newer := withChecksum(append([]byte("TRLC\x03"), good[5:]...))
	flipped := bytes.Clone(good)
	flipped[len(flipped)/2] ^= 0x10
	tests := []struct {
		name string
		data []byte
		want string
	}{
		{"empty", nil, "not a trellis circuit file"},
		{"foreign", []byte("PK\x03\x04 some zip file"), "not a trellis circuit file"},
		{"text", []byte("p cnf 3 2\n1 2 0\n"), "not a trellis circuit file"},
		{"newer", newer, "circuit file version 3 is newer than this trellis (1)"},
		{"magic only", []byte("TRLC"), "circuit file is damaged: truncated"},
		{"truncated", good[:len(good)-7], "circuit file is damaged: checksum mismatch"},
		{"flipped", flipped, "circuit file is damaged: checksum mismatch"},
		{"huge section", withChecksum([]byte("TRLC\x01\x02\xff\xff\xff\xff\x0f\x00\x00\x00\x00\x00")), "section 2 runs past the end"},
		{"huge node count", rawFile(sec(fileSecHeader, 3, 1<<40, 0, 0), sec(fileSecNodes, 0)), "do not fit"},
		{"no nodes", rawFile(sec(fileSecHeader, 3, 1, 0, 0)), "missing header or nodes"},
		{"bad kind", rawFile(sec(fileSecHeader, 0, 1, 0, 0), sec(fileSecNodes, 9, 0, 0)), "unknown kind 9"},
		{"child after parent", rawFile(sec(fileSecHeader, 0, 2, 1, 1), sec(fileSecNodes, uint64(TrueNode), 0, 0, uint64(AndNode), 0, 1, 0)), "does not come before it"},
		{"literal out of range", rawFile(sec(fileSecHeader, 2, 1, 0, 0), sec(fileSecNodes, uint64(LitNode), 10, 0)), "outside the variables 1..2"},
		{"root out of range", rawFile(sec(fileSecHeader, 2, 1, 0, 5), sec(fileSecNodes, uint64(TrueNode), 0, 0)), "root 5 is not a node"},
		{"atom variable", rawFile(sec(fileSecHeader, 2, 1, 0, 0), sec(fileSecNodes, uint64(TrueNode), 0, 0), sec(fileSecMeta, 1, 1, 'a', 7, 0, 0)), "atom 0 has variable 7"},
		{"shown atom", rawFile(sec(fileSecHeader, 2, 1, 0, 0), sec(fileSecNodes, uint64(TrueNode), 0, 0), sec(fileSecMeta, 0, 1, 3, 0)), "shown atom 3"},
		{"atom name", rawFile(sec(fileSecHeader, 2, 1, 0, 0), sec(fileSecNodes, uint64(TrueNode), 0, 0), sec(fileSecMeta, 1, 200, 'a', 1, 0, 0)), "atom name runs past the end"},
		{"trailing data", withChecksum(append([]byte("TRLC\x01\x01\x04\x02\x01\x00\x00\x02\x03\x01\x00\x00\x00\x07"), 0, 0, 0, 0)), "data after the end of sections"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Decode(bytes.NewReader(tt.data))
			if err == nil {
				t.Fatalf("Decode succeeded, want error containing %q", tt.want)
			}
			if !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error %q, want it to contain %q", err, tt.want)
			}
		})
	}
	if _, err := Decode(bytes.NewReader(flipped)); !errors.Is(err, ErrDamaged) {
		t.Errorf("damaged file: error %v does not wrap ErrDamaged", err)
	}
	if _, err := Decode(bytes.NewReader([]byte("xyz"))); !errors.Is(err, ErrNotCircuit) {
		t.Errorf("foreign file: error %v does not wrap ErrNotCircuit", err)
	}
}

// FuzzDecode checks that damaged circuit files never make Decode panic, and
// that whatever it accepts passes the shape checks and encodes again.
func FuzzDecode(f *testing.F) {
	good := encoded(f, smallCircuit(f))
	f.Add(good)
	f.Add(good[:len(good)/2])
	f.Add(good[:len(good)-1])
	for i := 0; i < len(good); i += 7 {
		b := bytes.Clone(good)
		b[i] ^= 1 << (i % 8)
		f.Add(b)
		f.Add(withChecksum(b))
	}
	c, _, err := Compile(context.Background(), dominoCNF(2, 3), Options{})
	if err != nil {
		f.Fatal(err)
	}
	f.Add(encoded(f, c))
	f.Add([]byte("TRLC"))
	f.Fuzz(func(t *testing.T, data []byte) {
		// Try the input as it is and with a correct checksum, so that
		// mutations also reach the checks behind the checksum.
		inputs := [][]byte{data}
		if len(data) >= 4 {
			inputs = append(inputs, withChecksum(data))
		}
		for _, in := range inputs {
			c, err := Decode(bytes.NewReader(in))
			if err != nil {
				continue
			}
			if err := verifyShape(c); err != nil {
				t.Fatalf("Decode accepted a malformed circuit: %v", err)
			}
			var buf bytes.Buffer
			if err := Encode(&buf, c); err != nil {
				t.Fatal(err)
			}
			d, err := Decode(&buf)
			if err != nil {
				t.Fatalf("Decode rejects what Encode wrote: %v", err)
			}
			if diff := cmp.Diff(c, d, cmpopts.EquateEmpty()); diff != "" {
				t.Fatalf("round trip differs:\n%s", diff)
			}
			Count(c)
		}
	})
}

// sec encodes a section whose payload is the given values as uvarints.
func sec(tag byte, vals ...uint64) []byte {
	var p []byte
	for _, v := range vals {
		p = binary.AppendUvarint(p, v)
	}
	out := []byte{tag}
	out = binary.AppendUvarint(out, uint64(len(p)))
	return append(out, p...)
}

// rawFile builds a circuit file of the current version from sections,
// with the end tag and a correct checksum.
func rawFile(sections ...[]byte) []byte {
	out := []byte("TRLC")
	out = binary.AppendUvarint(out, FileVersion)
	for _, s := range sections {
		out = append(out, s...)
	}
	out = append(out, fileSecEnd)
	return binary.LittleEndian.AppendUint32(out, crc32.ChecksumIEEE(out))
}

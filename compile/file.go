package compile

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"os"
	"path/filepath"
)

// The circuit file format. A file is
//
//	"TRLC"  magic
//	uvarint format version (FileVersion)
//	sections, each: tag byte, uvarint payload length, payload
//	tag 0   end of sections (no length)
//	4 bytes CRC-32 (IEEE, little endian) of everything before it
//
// Sections: 1 header (uvarint NumVars, number of nodes, number of edges,
// root); 2 nodes (per node: kind byte, argument (zig-zag varint for a
// LitNode, uvarint otherwise), uvarint number of children, then each child
// as the uvarint distance parent−child ≥ 1); 3 meta (uvarint count then per
// atom: uvarint name length, name bytes, uvarint variable; uvarint count then
// per shown atom its uvarint index; uvarint count then per weight: uvarint
// variable, zig-zag varint weight and priority). Readers skip sections with
// unknown tags.
const (
	fileMagic = "TRLC"
	// FileVersion is the version of the circuit file format this package
	// writes and the newest it reads.
	FileVersion = 1

	fileSecEnd    = 0
	fileSecHeader = 1
	fileSecNodes  = 2
	fileSecMeta   = 3

	// fileMaxVars bounds the number of variables a file may declare.
	fileMaxVars = 1 << 29
)

// Errors returned by Decode; the returned errors wrap them.
var (
	ErrNotCircuit = errors.New("not a trellis circuit file")
	ErrDamaged    = errors.New("circuit file is damaged")
)

// Encode writes c to w in the circuit file format.
func Encode(w io.Writer, c *Circuit) error {
	if err := verifyShape(c); err != nil {
		return fmt.Errorf("cannot write a malformed circuit: %v", err)
	}
	var out []byte
	out = append(out, fileMagic...)
	out = binary.AppendUvarint(out, FileVersion)

	var sec []byte
	section := func(tag byte) {
		out = append(out, tag)
		out = binary.AppendUvarint(out, uint64(len(sec)))
		out = append(out, sec...)
		sec = sec[:0]
	}
	sec = binary.AppendUvarint(sec, uint64(c.NumVars))
	sec = binary.AppendUvarint(sec, uint64(len(c.Kind)))
	sec = binary.AppendUvarint(sec, uint64(len(c.Children)))
	sec = binary.AppendUvarint(sec, uint64(c.Root))
	section(fileSecHeader)

	for i, k := range c.Kind {
		sec = append(sec, byte(k))
		if k == LitNode {
			sec = binary.AppendVarint(sec, int64(c.Arg[i]))
		} else {
			sec = binary.AppendUvarint(sec, uint64(c.Arg[i]))
		}
		kids := c.NodeChildren(int32(i))
		sec = binary.AppendUvarint(sec, uint64(len(kids)))
		for _, x := range kids {
			sec = binary.AppendUvarint(sec, uint64(int32(i)-x))
		}
	}
	section(fileSecNodes)

	m := &c.Meta
	sec = binary.AppendUvarint(sec, uint64(len(m.Atoms)))
	for _, a := range m.Atoms {
		sec = binary.AppendUvarint(sec, uint64(len(a.Name)))
		sec = append(sec, a.Name...)
		sec = binary.AppendUvarint(sec, uint64(a.Var))
	}
	sec = binary.AppendUvarint(sec, uint64(len(m.Shown)))
	for _, s := range m.Shown {
		sec = binary.AppendUvarint(sec, uint64(s))
	}
	sec = binary.AppendUvarint(sec, uint64(len(m.Weights)))
	for _, wt := range m.Weights {
		sec = binary.AppendUvarint(sec, uint64(wt.Var))
		sec = binary.AppendVarint(sec, wt.Weight)
		sec = binary.AppendVarint(sec, wt.Priority)
	}
	section(fileSecMeta)

	out = append(out, fileSecEnd)
	out = binary.LittleEndian.AppendUint32(out, crc32.ChecksumIEEE(out))
	_, err := w.Write(out)
	return err
}

// Decode reads a circuit in the circuit file format. A foreign, damaged,
// truncated or newer file is an error; the circuit is checked for well-formed
// nodes (kinds, arguments in range, children before parents) and metadata.
func Decode(r io.Reader) (*Circuit, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, err
	}
	return decodeBytes(data)
}

func decodeBytes(data []byte) (*Circuit, error) {
	if len(data) < len(fileMagic) || string(data[:len(fileMagic)]) != fileMagic {
		return nil, ErrNotCircuit
	}
	d := &fileReader{buf: data[len(fileMagic):]}
	version := d.uvarint()
	if d.err != nil {
		return nil, fmt.Errorf("%w: truncated", ErrDamaged)
	}
	if version > FileVersion {
		return nil, fmt.Errorf("circuit file version %d is newer than this trellis (%d)", version, FileVersion)
	}
	if version == 0 {
		return nil, fmt.Errorf("%w: version 0", ErrDamaged)
	}
	if len(data) < len(fileMagic)+2+4 {
		return nil, fmt.Errorf("%w: truncated", ErrDamaged)
	}
	body, sum := data[:len(data)-4], binary.LittleEndian.Uint32(data[len(data)-4:])
	if crc32.ChecksumIEEE(body) != sum {
		return nil, fmt.Errorf("%w: checksum mismatch", ErrDamaged)
	}
	consumed := len(data) - len(d.buf)
	if consumed > len(body) {
		return nil, fmt.Errorf("%w: truncated", ErrDamaged)
	}
	d.buf = body[consumed:]

	c := &Circuit{}
	var haveHeader, haveNodes bool
	var numNodes, numEdges, root uint64
	for {
		tag := d.byte()
		if d.err != nil {
			return nil, fmt.Errorf("%w: missing end of sections", ErrDamaged)
		}
		if tag == fileSecEnd {
			break
		}
		n := d.uvarint()
		if d.err != nil || n > uint64(len(d.buf)) {
			return nil, fmt.Errorf("%w: section %d runs past the end of the file", ErrDamaged, tag)
		}
		s := &fileReader{buf: d.buf[:n]}
		d.buf = d.buf[n:]
		switch tag {
		case fileSecHeader:
			haveHeader = true
			nv := s.uvarint()
			numNodes, numEdges, root = s.uvarint(), s.uvarint(), s.uvarint()
			if s.err != nil {
				return nil, fmt.Errorf("%w: short header", ErrDamaged)
			}
			if nv > fileMaxVars {
				return nil, fmt.Errorf("%w: %d variables", ErrDamaged, nv)
			}
			c.NumVars = int(nv)
		case fileSecNodes:
			if !haveHeader {
				return nil, fmt.Errorf("%w: nodes before the header", ErrDamaged)
			}
			haveNodes = true
			// Every node takes at least 3 bytes, every edge at least 1.
			if numNodes > uint64(len(s.buf))/3 || numEdges > uint64(len(s.buf)) {
				return nil, fmt.Errorf("%w: %d nodes and %d edges do not fit in %d bytes", ErrDamaged, numNodes, numEdges, len(s.buf))
			}
			c.Kind = make([]NodeKind, numNodes)
			c.Arg = make([]int32, numNodes)
			c.Start = make([]int32, numNodes+1)
			c.Children = make([]int32, 0, numEdges)
			for i := range c.Kind {
				k := s.byte()
				if k > byte(OrNode) {
					return nil, fmt.Errorf("%w: node %d has unknown kind %d", ErrDamaged, i, k)
				}
				c.Kind[i] = NodeKind(k)
				var arg int64
				if c.Kind[i] == LitNode {
					arg = s.varint()
				} else {
					arg = int64(s.uvarint())
				}
				if arg > fileMaxVars || arg < -fileMaxVars {
					return nil, fmt.Errorf("%w: node %d has argument %d", ErrDamaged, i, arg)
				}
				c.Arg[i] = int32(arg)
				nk := s.uvarint()
				if nk > uint64(len(s.buf)) || uint64(len(c.Children))+nk > numEdges {
					return nil, fmt.Errorf("%w: node %d has too many children", ErrDamaged, i)
				}
				for j := uint64(0); j < nk; j++ {
					dist := s.uvarint()
					if dist == 0 || dist > uint64(i) {
						return nil, fmt.Errorf("%w: node %d has a child that does not come before it", ErrDamaged, i)
					}
					c.Children = append(c.Children, int32(uint64(i)-dist))
				}
				c.Start[i+1] = int32(len(c.Children))
				if s.err != nil {
					return nil, fmt.Errorf("%w: node section truncated", ErrDamaged)
				}
			}
			if uint64(len(c.Children)) != numEdges {
				return nil, fmt.Errorf("%w: %d edges, header says %d", ErrDamaged, len(c.Children), numEdges)
			}
		case fileSecMeta:
			if err := decodeMeta(s, &c.Meta); err != nil {
				return nil, err
			}
		}
	}
	if len(d.buf) != 0 {
		return nil, fmt.Errorf("%w: data after the end of sections", ErrDamaged)
	}
	if !haveHeader || !haveNodes {
		return nil, fmt.Errorf("%w: missing header or nodes", ErrDamaged)
	}
	if root >= numNodes {
		return nil, fmt.Errorf("%w: root %d is not a node", ErrDamaged, root)
	}
	c.Root = int32(root)
	if len(c.Children) == 0 {
		c.Children = nil
	}
	if err := verifyShape(c); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrDamaged, err)
	}
	if err := verifyWidths(c); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrDamaged, err)
	}
	for i, a := range c.Meta.Atoms {
		if a.Var < 1 || int(a.Var) > c.NumVars {
			return nil, fmt.Errorf("%w: atom %d has variable %d outside 1..%d", ErrDamaged, i, a.Var, c.NumVars)
		}
	}
	for _, s := range c.Meta.Shown {
		if s < 0 || int(s) >= len(c.Meta.Atoms) {
			return nil, fmt.Errorf("%w: shown atom %d is not an atom", ErrDamaged, s)
		}
	}
	for _, w := range c.Meta.Weights {
		if w.Var < 1 || int(w.Var) > c.NumVars {
			return nil, fmt.Errorf("%w: weight on variable %d outside 1..%d", ErrDamaged, w.Var, c.NumVars)
		}
	}
	return c, nil
}

func decodeMeta(s *fileReader, m *Meta) error {
	n := s.uvarint()
	if n > uint64(len(s.buf))/2 {
		return fmt.Errorf("%w: %d atoms do not fit", ErrDamaged, n)
	}
	if n > 0 {
		m.Atoms = make([]NamedVar, n)
	}
	for i := range m.Atoms {
		l := s.uvarint()
		if l > uint64(len(s.buf)) {
			return fmt.Errorf("%w: atom name runs past the end", ErrDamaged)
		}
		m.Atoms[i].Name = string(s.buf[:l])
		s.buf = s.buf[l:]
		v := s.uvarint()
		if v > fileMaxVars {
			return fmt.Errorf("%w: atom variable %d", ErrDamaged, v)
		}
		m.Atoms[i].Var = Var(v)
	}
	n = s.uvarint()
	if n > uint64(len(s.buf)) {
		return fmt.Errorf("%w: %d shown atoms do not fit", ErrDamaged, n)
	}
	if n > 0 {
		m.Shown = make([]int32, n)
	}
	for i := range m.Shown {
		x := s.uvarint()
		if x > fileMaxVars {
			return fmt.Errorf("%w: shown atom %d", ErrDamaged, x)
		}
		m.Shown[i] = int32(x)
	}
	n = s.uvarint()
	if n > uint64(len(s.buf))/3 {
		return fmt.Errorf("%w: %d weights do not fit", ErrDamaged, n)
	}
	if n > 0 {
		m.Weights = make([]VarWeight, n)
	}
	for i := range m.Weights {
		v := s.uvarint()
		if v > fileMaxVars {
			return fmt.Errorf("%w: weight variable %d", ErrDamaged, v)
		}
		m.Weights[i] = VarWeight{Var: Var(v), Weight: s.varint(), Priority: s.varint()}
	}
	if s.err != nil {
		return fmt.Errorf("%w: meta section truncated", ErrDamaged)
	}
	if len(s.buf) != 0 {
		return fmt.Errorf("%w: extra bytes in the meta section", ErrDamaged)
	}
	return nil
}

// fileReader reads varints from a byte slice, remembering the first error.
type fileReader struct {
	buf []byte
	err error
}

func (r *fileReader) fail() {
	if r.err == nil {
		r.err = io.ErrUnexpectedEOF
	}
	r.buf = nil
}

func (r *fileReader) byte() byte {
	if len(r.buf) == 0 {
		r.fail()
		return 0
	}
	b := r.buf[0]
	r.buf = r.buf[1:]
	return b
}

func (r *fileReader) uvarint() uint64 {
	x, n := binary.Uvarint(r.buf)
	if n <= 0 {
		r.fail()
		return 0
	}
	r.buf = r.buf[n:]
	return x
}

func (r *fileReader) varint() int64 {
	x, n := binary.Varint(r.buf)
	if n <= 0 {
		r.fail()
		return 0
	}
	r.buf = r.buf[n:]
	return x
}

// Save writes c to the file path atomically: it writes a temporary file in
// the same directory and renames it over path.
func Save(path string, c *Circuit) (err error) {
	var buf bytes.Buffer
	if err := Encode(&buf, c); err != nil {
		return err
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp*")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(f.Name())
		}
	}()
	w := bufio.NewWriter(f)
	if _, err = w.Write(buf.Bytes()); err != nil {
		return err
	}
	if err = w.Flush(); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	// CreateTemp makes the file private; a circuit file is an ordinary one.
	if err = f.Chmod(0o644); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	return os.Rename(f.Name(), path)
}

// Load reads the circuit file at path.
func Load(path string) (*Circuit, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	c, err := decodeBytes(data)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return c, nil
}

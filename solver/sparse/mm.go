package sparse

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Matrix Market exchange format (Boisvert, Pozo & Remington 1996, "The
// Matrix Market exchange formats: initial design", NISTIR 5935): a header
// line "%%MatrixMarket matrix <format> <field> <symmetry>", comment lines
// starting with '%', a size line, then the entries.

// maxMMEntries bounds the declared size accepted by the reader so a
// corrupt size line cannot make it allocate without limit.
const maxMMEntries = 1 << 31

// MMError is a Matrix Market syntax or content error at a line.
type MMError struct {
	Line int
	Msg  string
}

func (e *MMError) Error() string {
	return fmt.Sprintf("matrix market: line %d: %s", e.Line, e.Msg)
}

type mmReader struct {
	sc   *bufio.Scanner
	line int
}

func newMMReader(r io.Reader) *mmReader {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 1<<20)
	return &mmReader{sc: sc}
}

// next returns the next line that is neither blank nor a comment.
func (m *mmReader) next() (string, bool, error) {
	for m.sc.Scan() {
		m.line++
		s := strings.TrimSpace(m.sc.Text())
		if s == "" || s[0] == '%' {
			continue
		}
		return s, true, nil
	}
	if err := m.sc.Err(); err != nil {
		return "", false, fmt.Errorf("matrix market: line %d: %w", m.line+1, err)
	}
	return "", false, nil
}

func (m *mmReader) errf(format string, args ...any) error {
	return &MMError{Line: m.line, Msg: fmt.Sprintf(format, args...)}
}

type mmHeader struct {
	field, symmetry string
}

// header reads the header line of a matrix in the given format (what
// names the content for the error).
func (m *mmReader) header(format, what string) (mmHeader, error) {
	const object = "matrix"
	if !m.sc.Scan() {
		if err := m.sc.Err(); err != nil {
			return mmHeader{}, fmt.Errorf("matrix market: line 1: %w", err)
		}
		return mmHeader{}, &MMError{Line: 1, Msg: "empty input, want a %%MatrixMarket header"}
	}
	m.line = 1
	f := strings.Fields(strings.ToLower(m.sc.Text()))
	if len(f) != 5 || f[0] != "%%matrixmarket" {
		return mmHeader{}, m.errf("header must be %q", "%%MatrixMarket matrix coordinate|array real|integer|pattern general|symmetric|skew-symmetric")
	}
	if f[1] != object {
		return mmHeader{}, m.errf("object %q not supported (allowed: %s)", f[1], object)
	}
	if f[2] != format {
		return mmHeader{}, m.errf("format %q not supported for %s (allowed: %s)", f[2], what, format)
	}
	return mmHeader{field: f[3], symmetry: f[4]}, nil
}

// sizeLine reads the size line, which must be want integers (form says
// which, for the error when it is missing). sz is nil when the line s is
// not want integers.
func (m *mmReader) sizeLine(want int, form string) (s string, sz []int, err error) {
	s, ok, err := m.next()
	if err != nil {
		return "", nil, err
	}
	if !ok {
		return "", nil, m.errf("missing size line %q", form)
	}
	sz, _ = parseInts(s, want)
	return s, sz, nil
}

// data reads data line k of the n declared ones (what names them).
func (m *mmReader) data(k, n int, what string) (string, error) {
	s, ok, err := m.next()
	if err != nil {
		return "", err
	}
	if !ok {
		return "", m.errf("end of input after %d of %d %s", k, n, what)
	}
	return s, nil
}

// end checks that nothing but blank and comment lines follows the n
// declared data lines (what names them).
func (m *mmReader) end(n int, what string) error {
	s, ok, err := m.next()
	if err != nil {
		return err
	}
	if ok {
		return m.errf("unexpected content %q after the %d declared %s", trim(s), n, what)
	}
	return nil
}

func parseInts(s string, want int) ([]int, bool) {
	f := strings.Fields(s)
	if len(f) != want {
		return nil, false
	}
	v := make([]int, want)
	for i, x := range f {
		n, err := strconv.Atoi(x)
		if err != nil {
			return nil, false
		}
		v[i] = n
	}
	return v, true
}

func parseValue(s string, line int, field string) (float64, error) {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, &MMError{Line: line, Msg: fmt.Sprintf("value %q is not a finite %s number", s, field)}
	}
	if field == "integer" && v != math.Trunc(v) {
		return 0, &MMError{Line: line, Msg: fmt.Sprintf("value %q is not an integer", s)}
	}
	return v, nil
}

// ReadMatrixMarket reads a sparse matrix in Matrix Market coordinate
// format: field real, integer or pattern (pattern entries read as 1);
// symmetry general, symmetric or skew-symmetric (the other triangle is
// filled in). Duplicate entries are summed. Errors name the line.
func ReadMatrixMarket(r io.Reader) (*CSR, error) {
	m := newMMReader(r)
	h, err := m.header("coordinate", "a sparse matrix")
	if err != nil {
		return nil, err
	}
	switch h.field {
	case "real", "integer", "pattern":
	default:
		return nil, m.errf("field %q not supported (allowed: real, integer, pattern)", h.field)
	}
	switch h.symmetry {
	case "general", "symmetric", "skew-symmetric":
	default:
		return nil, m.errf("symmetry %q not supported (allowed: general, symmetric, skew-symmetric)", h.symmetry)
	}
	s, sz, err := m.sizeLine(3, "rows cols entries")
	if err != nil {
		return nil, err
	}
	if sz == nil || sz[0] < 0 || sz[1] < 0 || sz[2] < 0 {
		return nil, m.errf("size line %q must be three non-negative integers: rows cols entries", s)
	}
	rows, cols, nnz := sz[0], sz[1], sz[2]
	if rows > maxMMEntries || cols > maxMMEntries || nnz > maxMMEntries {
		return nil, m.errf("size %d×%d with %d entries exceeds the limit %d", rows, cols, nnz, maxMMEntries)
	}
	if h.symmetry != "general" && rows != cols {
		return nil, m.errf("%s matrix must be square, got %d×%d", h.symmetry, rows, cols)
	}
	if rows > 0 && cols > 0 && uint64(nnz) > uint64(rows)*uint64(cols) {
		return nil, m.errf("%d entries declared for a %d×%d matrix", nnz, rows, cols)
	}
	if (rows == 0 || cols == 0) && nnz > 0 {
		return nil, m.errf("%d entries declared for an empty %d×%d matrix", nnz, rows, cols)
	}
	t := NewTriplet(rows, cols)
	want := 3
	if h.field == "pattern" {
		want = 2
	}
	for k := 0; k < nnz; k++ {
		s, err := m.data(k, nnz, "entries")
		if err != nil {
			return nil, err
		}
		f := strings.Fields(s)
		if len(f) != want {
			return nil, m.errf("entry %q: want %d fields (row col%s)", s, want, map[bool]string{true: " value", false: ""}[want == 3])
		}
		i, err1 := strconv.Atoi(f[0])
		j, err2 := strconv.Atoi(f[1])
		if err1 != nil || err2 != nil || i < 1 || i > rows || j < 1 || j > cols {
			return nil, m.errf("entry %q: indices must be integers in 1…%d, 1…%d", s, rows, cols)
		}
		v := 1.0
		if want == 3 {
			if v, err = parseValue(f[2], m.line, h.field); err != nil {
				return nil, err
			}
		}
		switch h.symmetry {
		case "symmetric":
			if j > i {
				return nil, m.errf("entry (%d, %d) above the diagonal in a symmetric file (lower triangle expected)", i, j)
			}
			t.Add(i-1, j-1, v)
			if i != j {
				t.Add(j-1, i-1, v)
			}
		case "skew-symmetric":
			if j >= i {
				return nil, m.errf("entry (%d, %d) on or above the diagonal in a skew-symmetric file (strict lower triangle expected)", i, j)
			}
			t.Add(i-1, j-1, v)
			t.Add(j-1, i-1, -v)
		default:
			t.Add(i-1, j-1, v)
		}
	}
	if err := m.end(nnz, "entries"); err != nil {
		return nil, err
	}
	return t.CSR(), nil
}

func trim(s string) string {
	if len(s) > 40 {
		return s[:40] + "…"
	}
	return s
}

// WriteMatrixMarket writes a in coordinate real general format, values
// with 17 significant digits so that they read back exactly.
func WriteMatrixMarket(w io.Writer, a *CSR) error {
	if a == nil {
		return errors.New("matrix market: nil matrix")
	}
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "%%%%MatrixMarket matrix coordinate real general\n%d %d %d\n", a.Rows, a.Cols, len(a.Val))
	buf := make([]byte, 0, 64)
	for i := 0; i < a.Rows; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			buf = buf[:0]
			buf = strconv.AppendInt(buf, int64(i+1), 10)
			buf = append(buf, ' ')
			buf = strconv.AppendInt(buf, int64(a.ColInd[p]+1), 10)
			buf = append(buf, ' ')
			buf = strconv.AppendFloat(buf, a.Val[p], 'g', 17, 64)
			buf = append(buf, '\n')
			bw.Write(buf)
		}
	}
	return bw.Flush()
}

// ReadVector reads a dense column vector in Matrix Market array format
// ("%%MatrixMarket matrix array real general", size line "n 1", then n
// values).
func ReadVector(r io.Reader) ([]float64, error) {
	m := newMMReader(r)
	h, err := m.header("array", "a vector")
	if err != nil {
		return nil, err
	}
	if h.field != "real" && h.field != "integer" {
		return nil, m.errf("field %q not supported for a vector (allowed: real, integer)", h.field)
	}
	if h.symmetry != "general" {
		return nil, m.errf("symmetry %q not supported for a vector (allowed: general)", h.symmetry)
	}
	s, sz, err := m.sizeLine(2, "n 1")
	if err != nil {
		return nil, err
	}
	if sz == nil || sz[0] < 0 || sz[1] != 1 {
		return nil, m.errf("size line %q must be \"n 1\" with n ≥ 0 (one column)", s)
	}
	if sz[0] > maxMMEntries {
		return nil, m.errf("length %d exceeds the limit %d", sz[0], maxMMEntries)
	}
	v := make([]float64, 0, min(sz[0], 1<<20))
	for k := 0; k < sz[0]; k++ {
		s, err := m.data(k, sz[0], "values")
		if err != nil {
			return nil, err
		}
		if len(strings.Fields(s)) != 1 {
			return nil, m.errf("value line %q: want one number", trim(s))
		}
		x, err := parseValue(s, m.line, h.field)
		if err != nil {
			return nil, err
		}
		v = append(v, x)
	}
	if err := m.end(sz[0], "values"); err != nil {
		return nil, err
	}
	return v, nil
}

// WriteVector writes v in Matrix Market array real general format.
func WriteVector(w io.Writer, v []float64) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "%%%%MatrixMarket matrix array real general\n%d 1\n", len(v))
	buf := make([]byte, 0, 32)
	for _, x := range v {
		buf = strconv.AppendFloat(buf[:0], x, 'g', 17, 64)
		buf = append(buf, '\n')
		bw.Write(buf)
	}
	return bw.Flush()
}

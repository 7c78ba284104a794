package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"

	"github.com/BurntSushi/toml"

	"tearline/remesh/geom/specimen"
	"tearline/remesh/size"
)

// caseFile is the whole case file. Only the command line knows this format:
// each section is mapped onto the typed options of the package that owns it.
type caseFile struct {
	Title    string          `toml:"title"`
	Units    unitsSection    `toml:"units"`
	Geometry geometrySection `toml:"geometry"`
	Mesh     meshSection     `toml:"mesh"`
	Material materialSection `toml:"material"`
	Loading  loadingSection  `toml:"loading"`
	Solver   solverSection   `toml:"solver"`
	Stop     stopSection     `toml:"stop"`
	Output   outputSection   `toml:"output"`
	Adapt    adaptSection    `toml:"adapt"`

	// specimen and size are built once by complete and reused by buildRun.
	specimen *specimen.Specimen
	size     *size.Field
}

// caseSource remembers where every key of a case came from, so that an
// error can say "ct.toml line 12 (mesh.h_far)" or "--set mesh.h_far".
type caseSource struct {
	path  string
	lines map[string]int    // dotted key → line in the file
	sets  map[string]string // dotted key → the --set argument that overrode it
}

// keyAt returns the dotted key written on line n of the case file, or "".
func (s *caseSource) keyAt(n int) string {
	if s == nil {
		return ""
	}
	for k, l := range s.lines {
		if l == n {
			return k
		}
	}
	return ""
}

// given reports whether the case file or a --set gave the dotted key.
func (s *caseSource) given(key string) bool {
	if s == nil {
		return false
	}
	_, inFile := s.lines[key]
	_, set := s.sets[key]
	return inFile || set
}

// where names the place of a dotted key for an error message.
func (s *caseSource) where(key string) string {
	if s == nil {
		return key
	}
	if arg, ok := s.sets[key]; ok {
		return fmt.Sprintf("--set %s", arg)
	}
	name := filepath.Base(s.path)
	if n, ok := s.lines[key]; ok {
		return fmt.Sprintf("%s line %d (%s)", name, n, key)
	}
	return fmt.Sprintf("%s (%s, default)", name, key)
}

// missing names a key the case must give and does not.
func (s *caseSource) missing(key string) string {
	return fmt.Sprintf("%s: %s is missing", filepath.Base(s.path), key)
}

// inputError marks an error caused by the user's input: exit status 2.
type inputError struct{ err error }

func (e inputError) Error() string { return e.err.Error() }
func (e inputError) Unwrap() error { return e.err }

// badInput wraps a formatted message as an input error.
func badInput(format string, args ...any) error {
	return inputError{fmt.Errorf(format, args...)}
}

// isInputError reports whether err was caused by bad input.
func isInputError(err error) bool {
	var ie inputError
	return errors.As(err, &ie)
}

var (
	tableHeader = regexp.MustCompile(`^\s*\[\[?\s*([A-Za-z0-9_.\-" ]+?)\s*\]\]?\s*(#.*)?$`)
	keyLine     = regexp.MustCompile(`^\s*([A-Za-z0-9_\-]+(?:\s*\.\s*[A-Za-z0-9_\-]+)*)\s*=`)
)

// keyLines maps every dotted key of a TOML text to the line it is defined
// on. It is a line scanner, not a parser: good enough to point at a key.
func keyLines(text string) map[string]int {
	lines := map[string]int{}
	table := ""
	for i, ln := range strings.Split(text, "\n") {
		if m := tableHeader.FindStringSubmatch(ln); m != nil {
			table = strings.ReplaceAll(strings.ReplaceAll(m[1], " ", ""), `"`, "")
			if _, ok := lines[table]; !ok {
				lines[table] = i + 1
			}
			continue
		}
		if m := keyLine.FindStringSubmatch(ln); m != nil {
			key := strings.ReplaceAll(m[1], " ", "")
			if table != "" {
				key = table + "." + key
			}
			if _, ok := lines[key]; !ok {
				lines[key] = i + 1
			}
		}
	}
	return lines
}

// loadCase reads a case file, applies the --set overrides in order, fills
// defaults and validates every section. Every error is an inputError that
// names the file, line and key.
func loadCase(path string, sets []string) (*caseFile, *caseSource, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, badInput("case file: %v", err)
	}
	src := &caseSource{path: path, lines: keyLines(string(data)), sets: map[string]string{}}
	c := &caseFile{}
	md, err := toml.Decode(string(data), c)
	if err != nil {
		return nil, nil, badInput("%s: %s", filepath.Base(path), tomlMessage(err, src))
	}
	if err := unknownKeys(md, func(k string) string { return src.where(k) }); err != nil {
		return nil, nil, err
	}
	for _, s := range sets {
		if err := applySet(c, s, src); err != nil {
			return nil, nil, err
		}
	}
	if err := c.complete(src); err != nil {
		return nil, nil, err
	}
	return c, src, nil
}

// tomlMessage turns the decoder's message into the case's words: the line,
// the key written there and what the key takes.
func tomlMessage(err error, src *caseSource) string {
	var pe toml.ParseError
	if errors.As(err, &pe) {
		line := pe.Position.Line
		msg := pe.Message
		if strings.Contains(msg, "out of range") {
			msg += " (a finite number is needed)"
		}
		if key := src.keyAt(line); key != "" {
			return fmt.Sprintf("line %d (%s): %s", line, key, msg)
		}
		return fmt.Sprintf("line %d: %s", line, msg)
	}
	msg := strings.TrimPrefix(err.Error(), "toml: ")
	if m := typeMismatch.FindStringSubmatch(msg); m != nil {
		return fmt.Sprintf("%s(%s): the value is %s; this key takes %s", m[1], m[2], typeWords(m[3]), typeWords(m[4]))
	}
	return msg
}

// setMessage drops the place of a --set's one-line document from a
// decoder message (the --set argument names it).
func setMessage(msg string) string {
	if i := strings.Index(msg, "): "); strings.HasPrefix(msg, "line 2 (") && i > 0 {
		return msg[i+3:]
	}
	return strings.TrimPrefix(msg, "line 2: ")
}

// typeMismatch matches the decoder's type error: its place, then the TOML
// and the Go types.
var typeMismatch = regexp.MustCompile(`^(line \d+ )\(last key "([^"]+)"\): incompatible types: TOML value has type ([\w\[\]]+); destination has type ([\w\[\]]+)`)

// typeWords names a TOML or Go type the way the case-file help does.
func typeWords(t string) string {
	switch {
	case strings.HasPrefix(t, "float"):
		return "a number"
	case strings.HasPrefix(t, "int"):
		return "a whole number"
	case t == "string":
		return "a string (in quotes)"
	case t == "bool":
		return "true or false"
	case strings.HasPrefix(t, "[]") || strings.HasPrefix(t, "array") || t == "slice":
		return "a list [ … ]"
	case strings.HasPrefix(t, "map") || t == "table" || t == "struct":
		return "a table"
	}
	return t
}

// unknownKeys turns undecoded keys into one error listing each with its place.
func unknownKeys(md toml.MetaData, where func(string) string) error {
	und := md.Undecoded()
	if len(und) == 0 {
		return nil
	}
	var msgs []string
	for _, k := range und {
		msgs = append(msgs, fmt.Sprintf("%s: unknown key", where(k.String())))
	}
	sort.Strings(msgs)
	return badInput("%s (see `tearline help case` for the keys of each section)", strings.Join(msgs, "; "))
}

// applySet applies one --set section.key=value override. The value is read
// as a TOML value; a bare word that is not one is taken as a string.
func applySet(c *caseFile, arg string, src *caseSource) error {
	eq := strings.IndexByte(arg, '=')
	if eq <= 0 {
		return badInput("--set %q: want section.key=value", arg)
	}
	key, val := strings.TrimSpace(arg[:eq]), strings.TrimSpace(arg[eq+1:])
	dot := strings.LastIndexByte(key, '.')
	if dot <= 0 || dot == len(key)-1 {
		return badInput("--set %q: the key must be section.key (for example mesh.h_far)", arg)
	}
	table, leaf := key[:dot], key[dot+1:]
	doc := fmt.Sprintf("[%s]\n%s = %s\n", table, leaf, val)
	if _, err := toml.Decode(doc, &caseFile{}); err != nil {
		// Not a TOML value: take it as a string.
		doc = fmt.Sprintf("[%s]\n%s = %q\n", table, leaf, val)
	}
	md, err := toml.Decode(doc, c)
	if err != nil {
		return badInput("--set %s: %s", arg, setMessage(tomlMessage(err, nil)))
	}
	if len(md.Undecoded()) > 0 {
		return badInput("--set %s: unknown key %s", arg, key)
	}
	src.sets[key] = arg
	return nil
}

// encode writes the case as run, defaults filled in.
func (c *caseFile) encode() ([]byte, error) {
	var buf bytes.Buffer
	buf.WriteString("# The case as run by tearline, defaults filled in.\n")
	if err := toml.NewEncoder(&buf).Encode(c); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

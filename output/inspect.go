package output

import (
	"errors"
	"fmt"
	"io"
	"math"
	"path"
	"strconv"
	"strings"

	"socmap/output/h5"
)

// ErrBadFile is matched (errors.Is) by every Inspect error: the file is
// missing, unreadable, not HDF5, truncated or damaged. The command line maps
// it to exit status 2 (bad input).
var ErrBadFile = errors.New("bad result file")

type badFileError struct{ err error }

func (e *badFileError) Error() string   { return e.err.Error() }
func (e *badFileError) Unwrap() []error { return []error{ErrBadFile, e.err} }

// Limits of the attribute values Inspect reports for objects other than the
// root (whose attributes are always reported in full).
const (
	InspectMaxElems  = 16  // arrays with more elements are summarised
	InspectMaxString = 200 // longer strings are summarised (bytes)
)

// Tree is the summary of a result file produced by Inspect.
type Tree struct {
	File string `json:"file"`
	Root *Node  `json:"root"`
}

// Node is one group or dataset. Units and description are lifted out of
// the attributes; Attrs holds the others.
type Node struct {
	Path        string     `json:"path"`
	Kind        string     `json:"kind"`            // "group", "dataset" or "other" (link, named type)
	Type        string     `json:"type,omitempty"`  // element type of a dataset, e.g. "float64", "complex128"
	Shape       []int      `json:"shape,omitempty"` // dataset dimensions (absent for a scalar)
	Storage     string     `json:"storage,omitempty"`
	Units       string     `json:"units,omitempty"`
	Description string     `json:"description,omitempty"`
	Attrs       []AttrInfo `json:"attrs,omitempty"`
	Children    []*Node    `json:"children,omitempty"`
}

// AttrInfo is one attribute. Value is a string, float64, int64 or a slice
// of these (non-finite floats become the strings "NaN", "+Inf", "-Inf" so
// that the tree encodes as JSON); it is absent when Omitted is set because
// the value is larger than the limits above.
type AttrInfo struct {
	Name    string `json:"name"`
	Type    string `json:"type"`
	Size    int    `json:"size"` // elements (bytes for a string)
	Value   any    `json:"value,omitempty"`
	Omitted bool   `json:"omitted,omitempty"`
}

// Inspect walks the HDF5 file at path and summarises every group and
// dataset: path, kind, shape, element type, storage, units, description,
// all root attributes and the small attributes of other objects. Errors are
// one line and match ErrBadFile.
func Inspect(path string) (*Tree, error) {
	f, err := h5.Open(path)
	if err != nil {
		return nil, &badFileError{err}
	}
	defer f.Close()
	root, err := inspectNode(f, "/", h5.KindGroup, true)
	if err != nil {
		return nil, &badFileError{err}
	}
	return &Tree{File: path, Root: root}, nil
}

func inspectNode(f *h5.File, p string, k h5.Kind, isRoot bool) (*Node, error) {
	n := &Node{Path: p, Kind: k.String()}
	if k == h5.KindOther {
		return n, nil
	}
	attrs, err := f.Attrs(p)
	if err != nil {
		return nil, err
	}
	for _, a := range attrs {
		if s, ok := a.Value.(string); ok && !isRoot {
			switch a.Name {
			case "units":
				n.Units = s
				continue
			case "description":
				n.Description = s
				continue
			}
		}
		n.Attrs = append(n.Attrs, attrInfo(a, isRoot))
	}
	if k == h5.KindDataset {
		info, err := f.Info(p)
		if err != nil {
			return nil, err
		}
		n.Type, n.Shape = info.TypeName, info.Shape
		n.Storage = info.Layout
		if info.Layout == "chunked" {
			n.Storage += " " + dims(info.Chunk)
		}
		if len(info.Filters) > 0 {
			n.Storage += " " + strings.Join(info.Filters, "+")
		}
		return n, nil
	}
	ents, err := f.List(p)
	if err != nil {
		return nil, err
	}
	for _, e := range ents {
		c, err := inspectNode(f, path.Join(p, e.Name), e.Kind, false)
		if err != nil {
			return nil, err
		}
		n.Children = append(n.Children, c)
	}
	return n, nil
}

func jsonFloat(x float64) any {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case math.IsInf(x, 1):
		return "+Inf"
	case math.IsInf(x, -1):
		return "-Inf"
	}
	return x
}

func attrInfo(a h5.Attr, full bool) AttrInfo {
	ai := AttrInfo{Name: a.Name}
	switch v := a.Value.(type) {
	case string:
		ai.Type, ai.Size, ai.Value = "string", len(v), v
		ai.Omitted = !full && len(v) > InspectMaxString
	case float64:
		ai.Type, ai.Size, ai.Value = "float64", 1, jsonFloat(v)
	case int64:
		ai.Type, ai.Size, ai.Value = "int64", 1, v
	case []float64:
		vs := make([]any, len(v))
		for i, x := range v {
			vs[i] = jsonFloat(x)
		}
		ai.Type, ai.Size, ai.Value = fmt.Sprintf("float64[%d]", len(v)), len(v), vs
		ai.Omitted = !full && len(v) > InspectMaxElems
	case []int64:
		ai.Type, ai.Size, ai.Value = fmt.Sprintf("int64[%d]", len(v)), len(v), v
		ai.Omitted = !full && len(v) > InspectMaxElems
	case []string:
		n := 0
		for _, s := range v {
			n += len(s)
		}
		ai.Type, ai.Size, ai.Value = fmt.Sprintf("string[%d]", len(v)), len(v), v
		ai.Omitted = !full && (len(v) > InspectMaxElems || n > InspectMaxString)
	case h5.Unsupported:
		ai.Type, ai.Omitted = string(v), true
	default:
		ai.Type, ai.Omitted = fmt.Sprintf("%T", v), true
	}
	if ai.Omitted {
		ai.Value = nil
	}
	return ai
}

// dims formats a shape as 30×40 (a scalar as "scalar").
func dims(s []int) string {
	if len(s) == 0 {
		return "scalar"
	}
	parts := make([]string, len(s))
	for i, d := range s {
		parts[i] = strconv.Itoa(d)
	}
	return strings.Join(parts, "×")
}

// String returns the text form of the tree (see WriteText).
func (t *Tree) String() string {
	var b strings.Builder
	t.WriteText(&b)
	return b.String()
}

// WriteText writes the tree as indented text: one line per group ("name/")
// and dataset ("name  type[shape]  storage  [units]  description"), each
// followed by its attributes ("@name: value"); multi-line strings (the plan)
// are printed as an indented block.
func (t *Tree) WriteText(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "%s\n", t.File)
	writeNode(&b, t.Root, 0)
	_, err := io.WriteString(w, b.String())
	return err
}

func writeNode(b *strings.Builder, n *Node, depth int) {
	ind := strings.Repeat("  ", depth)
	name := path.Base(n.Path)
	switch n.Kind {
	case "group":
		if n.Path == "/" {
			name = ""
		}
		fmt.Fprintf(b, "%s%s/\n", ind, name)
	case "dataset":
		fmt.Fprintf(b, "%s%s  %s[%s]  %s", ind, name, n.Type, dims(n.Shape), n.Storage)
		if n.Units != "" {
			fmt.Fprintf(b, "  [%s]", n.Units)
		}
		if n.Description != "" {
			fmt.Fprintf(b, "  %s", oneLine(n.Description, 100))
		}
		b.WriteByte('\n')
	default:
		fmt.Fprintf(b, "%s%s  (link or named type)\n", ind, name)
	}
	for _, a := range n.Attrs {
		fmt.Fprintf(b, "%s  @%s: %s\n", ind, a.Name, attrText(a, ind+"    "))
	}
	for _, c := range n.Children {
		writeNode(b, c, depth+1)
	}
}

func oneLine(s string, max int) string {
	s = strings.ReplaceAll(s, "\n", "⏎")
	if r := []rune(s); len(r) > max {
		s = string(r[:max]) + "…"
	}
	return s
}

func attrText(a AttrInfo, ind string) string {
	if a.Omitted {
		if a.Type == "string" {
			return fmt.Sprintf("(string, %d bytes, not shown)", a.Size)
		}
		return fmt.Sprintf("(%s, %d elements, not shown)", a.Type, a.Size)
	}
	switch v := a.Value.(type) {
	case string:
		if strings.Contains(strings.TrimRight(v, "\n"), "\n") {
			lines := strings.Split(strings.TrimRight(v, "\n"), "\n")
			return "|\n" + ind + strings.Join(lines, "\n"+ind)
		}
		return strconv.Quote(v)
	case []string:
		q := make([]string, len(v))
		for i, s := range v {
			q[i] = strconv.Quote(oneLine(s, 60))
		}
		return "[" + strings.Join(q, ", ") + "]"
	}
	return fmt.Sprint(a.Value)
}

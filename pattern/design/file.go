package design

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"phasonhull/pattern"
)

// Kind says how a design file describes the design.
type Kind string

// The kinds of design file.
const (
	KindPositions Kind = "positions" // site positions, in any format pattern.Read takes
	KindSpec      Kind = "spec"      // a JSON Spec, generated without its perturbations
)

// File is a design read from a file: the layout a sample was made from.
type File struct {
	Path string
	Kind Kind
	// Pattern is the design's sites: the positions read, or the spec's
	// unperturbed layout; nil for a plate.
	Pattern *pattern.Pattern
	// Plane is the design's sites when they lie in the plane (a plate
	// family's spec, or centroids pattern.IsPlanar calls planar); nil for
	// a chain. Exactly one of Pattern and Plane is set.
	Plane *pattern.Plane
	// Spec is the spec of a KindSpec file, its perturbations cleared; nil
	// for positions.
	Spec *Spec
	// Notes say what reading left out.
	Notes []string
}

// ReadFile reads the design at path. A JSON object with a "family" key is
// a design Spec (see ReadSpec), generated as a chain (Pattern) or, for a
// plate family, a plane (Plane); anything else is a positions file for
// pattern.ReadSitesFile, a chain or a plane by its one rule. A spec's fabrication perturbations (noise, missing,
// extra, drift) are cleared, with a note: the design is the unperturbed
// layout. unit, when not empty, overrides the unit of the file or spec.
//
// Bad input is refused with a *pattern.InputError naming the file and,
// where they are known, the line and column.
func ReadFile(path, unit string) (*File, error) {
	unit = strings.TrimSpace(unit)
	f := &File{Path: path}
	spec, isSpec, err := readSpecIfSpec(path)
	if err != nil {
		return nil, err
	}
	if isSpec {
		f.Kind = KindSpec
		var left []string
		for _, v := range []struct {
			name string
			val  *float64
		}{{"noise", &spec.Noise}, {"missing", &spec.Missing}, {"extra", &spec.Extra}, {"drift", &spec.Drift}} {
			if *v.val != 0 {
				left = append(left, fmt.Sprintf("%s = %g", v.name, *v.val))
				*v.val = 0
			}
		}
		if len(left) > 0 {
			f.Notes = append(f.Notes, "the design spec's fabrication perturbations ("+strings.Join(left, ", ")+") are left out: the design is the unperturbed layout")
		}
		if spec.Family.Dimension() == 2 {
			if f.Plane, err = GeneratePlane(spec); err != nil {
				return nil, &pattern.InputError{File: path, Err: err}
			}
			f.Plane.Source = path
		} else {
			if f.Pattern, err = Generate(spec); err != nil {
				return nil, &pattern.InputError{File: path, Err: err}
			}
			f.Pattern.Source = path
		}
		f.Spec = &spec
	} else {
		f.Kind = KindPositions
		sites, err := pattern.ReadSitesFile(path, pattern.ReadOptions{Unit: unit})
		if err != nil {
			return nil, err
		}
		f.Pattern, f.Plane = sites.Chain, sites.Plane
	}
	if unit != "" {
		if f.Plane != nil {
			f.Plane.Unit = unit
		} else {
			f.Pattern.Unit = unit
		}
	}
	return f, nil
}

// readSpecIfSpec reads path as a design spec when it is a JSON object
// with a "family" key; isSpec is false (and err nil) for anything else.
func readSpecIfSpec(path string) (spec Spec, isSpec bool, err error) {
	file, err := os.Open(path)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return spec, false, &pattern.InputError{File: path, Err: err}
	}
	defer file.Close()
	data, err := io.ReadAll(io.LimitReader(file, MaxSpecBytes+1))
	if err != nil {
		return spec, false, &pattern.InputError{File: path, Err: err}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	trimmed := bytes.TrimLeft(data, " \t\r\n")
	if len(data) > MaxSpecBytes || len(trimmed) == 0 || trimmed[0] != '{' {
		return spec, false, nil
	}
	var keys map[string]json.RawMessage
	if json.Unmarshal(trimmed, &keys) != nil {
		// Not one JSON object: a spec would have to be; let the readers
		// say what is wrong with it as a positions file, unless it names
		// a family.
		if !bytes.Contains(trimmed, []byte(`"family"`)) {
			return spec, false, nil
		}
	} else if _, ok := keys["family"]; !ok {
		return spec, false, nil
	}
	// The whole file, so that the lines of an error are the file's.
	spec, err = ReadSpec(bytes.NewReader(data), path)
	return spec, true, err
}

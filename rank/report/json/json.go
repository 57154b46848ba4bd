// Package json writes a report.Report as one JSON document: its schema
// version, the command, the lines about the operating point, the point
// and each place's stresses as numbers, each table as an array of objects
// named by the table (results, candidates, grid, crossovers), the
// sections, the notes of the flag codes and explain's steps. Members are
// the field names of report.Fields, numbers in the unit their name ends
// in; an unknown number is null. A library's text is kept as written,
// its control characters escaped as JSON escapes.
package json

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"

	"swrank/rank/report"
)

// Write writes rep to w as an indented JSON document.
func Write(w io.Writer, rep *report.Report) error {
	doc := object{}
	doc.add("schema_version", report.SchemaVersion)
	doc.add("command", rep.Command)
	if rep.Library != "" {
		doc.add("library", rep.Library)
		doc.add("library_parts", rep.Parts)
	}
	for _, v := range rep.Meta {
		doc.add(v.Key, value(v.Key, v.Cell))
	}
	about := rep.About
	if about == nil {
		about = []string{}
	}
	doc.add("about", about)
	if rep.Point != nil {
		pt := record(rep.Point)
		for _, place := range []string{"control", "sync"} {
			if s, ok := rep.Stress[place]; ok {
				pt.add(place, record(s))
			}
		}
		doc.add("operating_point", pt)
	}
	for _, t := range rep.Tables {
		rows := []object{}
		for _, r := range t.Rows {
			o := record(r.Record)
			for _, name := range []string{"devices", "points", "tried"} {
				if sub, ok := r.Sub[name]; ok {
					list := []object{}
					for _, s := range sub {
						list = append(list, record(s))
					}
					o.add(name, list)
				}
			}
			rows = append(rows, o)
		}
		doc.add(t.Name, rows)
	}
	if t := rep.Main(); t != nil && t.More > 0 {
		doc.add("more_parts", t.More)
	}
	for _, s := range rep.Sections {
		lines := s.Lines
		if lines == nil {
			lines = []string{}
		}
		doc.add(s.Key, lines)
	}
	notes := []object{}
	for _, n := range rep.Notes {
		o := object{}
		o.add("code", n.Code)
		o.add("text", n.Text)
		notes = append(notes, o)
	}
	doc.add("notes", notes)
	if len(rep.Steps) > 0 {
		steps := []object{}
		for _, s := range rep.Steps {
			o := object{}
			if s.Device != "" {
				o.add("device", s.Device)
			}
			o.add("topic", s.Topic)
			o.add("formula", s.Formula)
			terms := []object{}
			for _, t := range s.Terms {
				to := object{}
				to.add("name", t.Name)
				to.add("value", number(t.Value))
				to.add("unit", t.Unit)
				terms = append(terms, to)
			}
			o.add("terms", terms)
			steps = append(steps, o)
		}
		doc.add("steps", steps)
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(doc); err != nil {
		return fmt.Errorf("json: %w", err)
	}
	// DEL, C1 controls and bidirectional overrides, which encoding/json
	// writes raw, as \uXXXX escapes.
	_, err := w.Write(report.GuardJSON(buf.Bytes()))
	return err
}

// number is a cell's number, or nil (null) when unknown.
func number(c report.Cell) any {
	if !c.Known {
		return nil
	}
	return c.Num
}

// value is a cell as its field's kind says.
func value(key string, c report.Cell) any {
	f, _ := report.FieldOf(key)
	switch f.Kind {
	case report.KindText:
		if !c.Known {
			return nil
		}
		return c.Text
	case report.KindBool:
		if !c.Known {
			return nil
		}
		return c.Num != 0
	case report.KindList:
		if c.List == nil {
			return []string{}
		}
		return c.List
	}
	return number(c)
}

// record is a record as an object, in its order.
func record(r report.Record) object {
	o := object{}
	for _, v := range r {
		o.add(v.Key, value(v.Key, v.Cell))
	}
	return o
}

// object is a JSON object that keeps its members' order.
type object []member

type member struct {
	key string
	val any
}

func (o *object) add(k string, v any) { *o = append(*o, member{k, v}) }

// MarshalJSON writes the members in order.
func (o object) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, m := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		k, err := json.Marshal(m.key)
		if err != nil {
			return nil, err
		}
		v, err := json.Marshal(m.val)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", m.key, err)
		}
		b.Write(k)
		b.WriteByte(':')
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

package devices

import (
	"reflect"
	"strings"
	"unsafe"

	q "swrank/devices/quantity"
)

// cellKind says how a column's cell is decoded.
type cellKind uint8

const (
	cellString cellKind = iota // plain text (part, package, notes, rds_on_curve)
	cellQty                    // required quantity: a blank cell is an error
	cellOpt                    // optional quantity (q.Opt): a blank cell is "not given"
	cellOther                  // a type with its own UnmarshalCSV (technology, flags, price)
)

// column describes one column of a parts library, derived once from the
// csv struct tags of Part: the tags stay the one definition of the names.
type column struct {
	name     string       // the tag, e.g. "qg"
	field    int          // index of the field in Part
	typ      reflect.Type // the field's type
	offset   uintptr      // the field's offset in Part
	okOff    uintptr      // cellOpt: offset of Opt.OK within the field
	kind     cellKind     //
	qkind    q.Kind       // cellQty, cellOpt: the quantity's kind
	parser   *q.Parser    // cellQty, cellOpt: parses the quantity
	required bool         // the column must be present and every cell filled
}

// schema is the table of Part's columns.
type schema struct {
	cols   []column
	byName map[string]int // column name → index in cols
	ranged []rangeCol     // the columns with a plausible range, in cols order
}

// partSchema is built once from Part's tags and never changed afterwards.
var partSchema = buildSchema()

type csvUnmarshaler interface{ UnmarshalCSV(string) error }

var quantityType = reflect.TypeFor[interface{ Kind() q.Kind }]()

func buildSchema() *schema {
	t := reflect.TypeFor[Part]()
	s := &schema{byName: map[string]int{}}
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		tag := f.Tag.Get("csv")
		if tag == "" || tag == "-" || !f.IsExported() {
			continue
		}
		name, _, _ := strings.Cut(tag, ",")
		c := column{name: name, field: i, typ: f.Type, offset: f.Offset}
		switch {
		case f.Type.Kind() == reflect.String:
			c.kind = cellString
		case f.Type.Kind() == reflect.Float64 && f.Type.Implements(quantityType):
			c.kind = cellQty
			c.qkind = reflect.Zero(f.Type).Interface().(interface{ Kind() q.Kind }).Kind()
			c.required = true
		case f.Type.Kind() == reflect.Struct && strings.HasPrefix(f.Type.Name(), "Opt[") &&
			f.Type.NumField() == 2 && f.Type.Field(0).Type.Implements(quantityType):
			c.kind = cellOpt
			c.qkind = reflect.Zero(f.Type.Field(0).Type).Interface().(interface{ Kind() q.Kind }).Kind()
			c.okOff = f.Type.Field(1).Offset
		case reflect.PointerTo(f.Type).Implements(reflect.TypeFor[csvUnmarshaler]()):
			c.kind = cellOther
		default:
			panic("devices: Part field " + f.Name + " has a type the loader cannot decode")
		}
		if name == "part" {
			c.required = true
		}
		if c.kind == cellQty || c.kind == cellOpt {
			c.parser = q.NewParser(c.qkind)
		}
		s.byName[name] = len(s.cols)
		s.cols = append(s.cols, c)
	}
	s.ranged = buildRangeCols(s)
	return s
}

// Columns returns the names of all columns of a parts library, in the order
// of Part's fields.
func Columns() []string {
	out := make([]string, len(partSchema.cols))
	for i, c := range partSchema.cols {
		out[i] = c.name
	}
	return out
}

// RequiredColumns returns the names of the columns every library must have.
func RequiredColumns() []string {
	var out []string
	for _, c := range partSchema.cols {
		if c.required {
			out = append(out, c.name)
		}
	}
	return out
}

// parse parses a quantity cell, with a decimal comma when comma is set.
func (c *column) parse(cell string, comma bool) (float64, error) {
	if comma {
		return c.parser.ParseDecimalComma(cell)
	}
	return c.parser.Parse(cell)
}

// set decodes one cell into the part's field. It gives exactly the results
// and errors of the field type's UnmarshalCSV method, without reflection
// on the hot path; with comma set, numbers may have a decimal comma.
func (c *column) set(p *Part, cell string, comma bool) error {
	ptr := unsafe.Add(unsafe.Pointer(p), c.offset)
	switch c.kind {
	case cellQty:
		v, err := c.parse(cell, comma)
		if err != nil {
			return err
		}
		*(*float64)(ptr) = v
		return nil
	case cellOpt:
		v, err := c.parse(cell, comma)
		if err != nil {
			if err == q.ErrEmpty { // blank cell (returned unwrapped): not given
				*(*float64)(ptr) = 0
				*(*bool)(unsafe.Add(ptr, c.okOff)) = false
				return nil
			}
			return err
		}
		*(*float64)(ptr) = v
		*(*bool)(unsafe.Add(ptr, c.okOff)) = true
		return nil
	case cellString:
		*(*string)(ptr) = cell
		return nil
	}
	if pr, ok := reflect.NewAt(c.typ, ptr).Interface().(*Price); ok {
		return pr.parse(cell, comma)
	}
	return reflect.NewAt(c.typ, ptr).Interface().(csvUnmarshaler).UnmarshalCSV(cell)
}

// given reports whether the column's value is given in p (always true for
// required and text columns).
func (c *column) given(p *Part) bool {
	if c.kind != cellOpt {
		return true
	}
	return *(*bool)(unsafe.Add(unsafe.Pointer(p), c.offset+c.okOff))
}

// value returns a quantity column's value in p (0 for other columns).
func (c *column) value(p *Part) float64 {
	if c.kind != cellQty && c.kind != cellOpt {
		return 0
	}
	return *(*float64)(unsafe.Add(unsafe.Pointer(p), c.offset))
}

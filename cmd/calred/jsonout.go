package main

import (
	"bytes"
	"encoding"
	"encoding/json"
	"io"
	"math"
	"reflect"
	"strings"
)

// writeJSON writes v as indented JSON. A number that is not finite (NaN
// for a quantity that could not be determined, ±Inf for infinite degrees
// of freedom) has no JSON form; it is written as null wherever it sits, so
// that one undetermined value cannot cost the whole object.
func writeJSON(w io.Writer, v any) error {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	if err := enc.Encode(jsonFinite(reflect.ValueOf(v))); err != nil {
		return err
	}
	_, err := w.Write(buf.Bytes())
	return err
}

var (
	jsonMarshalerType = reflect.TypeFor[json.Marshaler]()
	textMarshalerType = reflect.TypeFor[encoding.TextMarshaler]()
)

// jsonFinite returns v as encoding/json would see it, with every non-finite
// float replaced by nil. Struct fields keep their order and JSON names
// (tags with omitempty and "-" are honoured; embedded structs are
// flattened); a value with its own MarshalJSON or MarshalText is left to it.
func jsonFinite(v reflect.Value) any {
	if !v.IsValid() {
		return nil
	}
	if t := v.Type(); t.Implements(jsonMarshalerType) || t.Implements(textMarshalerType) {
		if (v.Kind() == reflect.Pointer || v.Kind() == reflect.Interface) && v.IsNil() {
			return nil
		}
		return v.Interface()
	}
	switch v.Kind() {
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			return nil
		}
		return jsonFinite(v.Elem())
	case reflect.Float32, reflect.Float64:
		f := v.Float()
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return nil
		}
		return f
	case reflect.Slice:
		if v.IsNil() {
			return nil
		}
		fallthrough
	case reflect.Array:
		out := make([]any, v.Len())
		for i := range out {
			out[i] = jsonFinite(v.Index(i))
		}
		return out
	case reflect.Map:
		if v.IsNil() {
			return nil
		}
		if v.Type().Key().Kind() != reflect.String {
			return v.Interface()
		}
		out := make(map[string]any, v.Len())
		for it := v.MapRange(); it.Next(); {
			out[it.Key().String()] = jsonFinite(it.Value())
		}
		return out
	case reflect.Struct:
		var obj jsonObject
		jsonStructFields(v, &obj)
		return obj
	}
	return v.Interface()
}

// jsonStructFields appends the exported fields of struct v to obj.
func jsonStructFields(v reflect.Value, obj *jsonObject) {
	t := v.Type()
	for i := range t.NumField() {
		sf := t.Field(i)
		tag := sf.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		fv := v.Field(i)
		if sf.Anonymous && name == "" {
			ft := sf.Type
			if ft.Kind() == reflect.Pointer {
				if fv.IsNil() {
					continue
				}
				fv, ft = fv.Elem(), ft.Elem()
			}
			if ft.Kind() == reflect.Struct && !ft.Implements(jsonMarshalerType) {
				jsonStructFields(fv, obj)
				continue
			}
		}
		if !sf.IsExported() {
			continue
		}
		if name == "" {
			name = sf.Name
		}
		if strings.Contains(","+opts+",", ",omitempty,") && jsonEmpty(fv) {
			continue
		}
		*obj = append(*obj, jsonMember{name, jsonFinite(fv)})
	}
}

// jsonEmpty reports whether omitempty drops v (encoding/json: false, 0, a
// nil pointer or interface, an empty array, slice, map or string; never a
// struct).
func jsonEmpty(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Struct:
		return false
	case reflect.Array, reflect.Slice, reflect.Map, reflect.String:
		return v.Len() == 0
	}
	return v.IsZero()
}

// jsonObject is a JSON object that keeps its members in order.
type jsonObject []jsonMember

type jsonMember struct {
	key string
	val any
}

// MarshalJSON writes the members in order.
func (o jsonObject) MarshalJSON() ([]byte, error) {
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
		b.Write(k)
		b.WriteByte(':')
		val, err := json.Marshal(m.val)
		if err != nil {
			return nil, err
		}
		b.Write(val)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

package render

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
)

// JSON cannot hold NaN or infinity, and encoding/json fails on them. compute
// keeps every figure finite (compute/limits.go), but the JSON writer must
// never fail on a figure that slipped through: a report that holds one is
// written with null in its place and a top-level "warnings" list that
// names where (README.md, "Choices made where the contract is silent").

// encodeJSON writes v as indented JSON without HTML escaping. Only when
// that fails on a non-finite number does it take the slower way that
// writes null for each.
func encodeJSON(v any) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	err := enc.Encode(v)
	var uv *json.UnsupportedValueError
	if err == nil || !errors.As(err, &uv) {
		if err != nil {
			return nil, err
		}
		return buf.Bytes(), nil
	}
	var bad []string
	tree := jsonTree(reflect.ValueOf(v), "", &bad)
	if obj, ok := tree.(jsonObject); ok && len(bad) > 0 {
		const most = 20
		var ws []string
		for i, p := range bad {
			if i == most {
				ws = append(ws, fmt.Sprintf("and %d more numbers written as null", len(bad)-most))
				break
			}
			ws = append(ws, fmt.Sprintf("%s is not a finite number (NaN or infinite), written as null", p))
		}
		tree = append(obj, jsonKV{"warnings", ws})
	}
	buf.Reset()
	if err := enc.Encode(tree); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// jsonObject is a JSON object whose keys keep their order.
type jsonObject []jsonKV

type jsonKV struct {
	k string
	v any
}

func (o jsonObject) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	b.WriteByte('{')
	for i, kv := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		if err := enc.Encode(kv.k); err != nil {
			return nil, err
		}
		b.WriteByte(':')
		if err := enc.Encode(kv.v); err != nil {
			return nil, err
		}
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// jsonTree turns v into values encoding/json writes the way it would
// write v (field names and omitempty from the tags, embedded structs
// inlined), with nil for every NaN or infinity, whose paths go to bad.
func jsonTree(v reflect.Value, path string, bad *[]string) any {
	switch v.Kind() {
	case reflect.Invalid:
		return nil
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			return nil
		}
		return jsonTree(v.Elem(), path, bad)
	case reflect.Struct:
		return jsonFields(v, path, bad, nil)
	case reflect.Slice:
		if v.IsNil() {
			return nil
		}
		fallthrough
	case reflect.Array:
		out := make([]any, v.Len())
		for i := range out {
			out[i] = jsonTree(v.Index(i), fmt.Sprintf("%s[%d]", path, i), bad)
		}
		return out
	case reflect.Map:
		if v.IsNil() {
			return nil
		}
		out := make(map[string]any, v.Len())
		it := v.MapRange()
		for it.Next() {
			k := fmt.Sprint(it.Key().Interface())
			out[k] = jsonTree(it.Value(), path+"."+k, bad)
		}
		return out
	case reflect.Float32, reflect.Float64:
		if f := v.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
			*bad = append(*bad, strings.TrimPrefix(path, "."))
			return nil
		}
	}
	return v.Interface()
}

// jsonFields appends the fields of struct v to obj.
func jsonFields(v reflect.Value, path string, bad *[]string, obj jsonObject) jsonObject {
	if obj == nil {
		obj = jsonObject{}
	}
	t := v.Type()
	for i := 0; i < t.NumField(); i++ {
		sf, fv := t.Field(i), v.Field(i)
		tag := sf.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		if sf.Anonymous && name == "" {
			if fv.Kind() == reflect.Pointer {
				if fv.IsNil() {
					continue
				}
				fv = fv.Elem()
			}
			if fv.Kind() == reflect.Struct {
				obj = jsonFields(fv, path, bad, obj)
				continue
			}
		}
		if !sf.IsExported() {
			continue
		}
		if name == "" {
			name = sf.Name
		}
		if strings.Contains(opts, "omitempty") && jsonEmpty(fv) {
			continue
		}
		obj = append(obj, jsonKV{name, jsonTree(fv, path+"."+name, bad)})
	}
	return obj
}

// jsonEmpty is encoding/json's test for omitempty.
func jsonEmpty(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Array, reflect.Map, reflect.Slice, reflect.String:
		return v.Len() == 0
	case reflect.Bool:
		return !v.Bool()
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return v.Int() == 0
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		return v.Uint() == 0
	case reflect.Float32, reflect.Float64:
		return v.Float() == 0
	case reflect.Pointer, reflect.Interface:
		return v.IsNil()
	}
	return false
}

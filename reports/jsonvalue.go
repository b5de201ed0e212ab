package reports

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"strings"
)

// encodeJSON encodes v as JSON after making it ready (see jsonReady), with
// HTML characters left as they are ("≤ -1.0 dBTP", "<" in a reason) and
// without a trailing newline. indent "" means compact.
func encodeJSON(v any, prefix, indent string) ([]byte, error) {
	ready, err := jsonReady(v)
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if indent != "" {
		enc.SetIndent(prefix, indent)
	}
	if err := enc.Encode(ready); err != nil {
		return nil, err
	}
	return bytes.TrimSuffix(b.Bytes(), []byte("\n")), nil
}

// jsonReady returns a copy of v that encodes the way the package doc
// promises, without changing the caller's value:
//   - a nil slice or map becomes empty, so lists are [] and never null;
//   - a nil embedded struct pointer becomes a zero struct, so its keys stay;
//   - a pointer or interface holding NaN or ±Inf becomes nil (null: an
//     undefined figure);
//   - NaN or ±Inf in a plain number field is an error naming the key,
//     since encoding/json cannot write it and null would break the type.
//
// It works by reflection so that fields other engineers add to
// measure.Measurement or rules.Result are covered without changes here.
func jsonReady(v any) (any, error) {
	rv, err := readyValue(reflect.ValueOf(v), "")
	if err != nil {
		return nil, err
	}
	if !rv.IsValid() {
		return nil, nil
	}
	return rv.Interface(), nil
}

func readyValue(v reflect.Value, key string) (reflect.Value, error) {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if f := v.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
			return v, fmt.Errorf("%s is %v, which JSON cannot hold", keyName(key), f)
		}
	case reflect.Pointer:
		return readyPointer(v, key)
	case reflect.Interface:
		if v.IsNil() {
			return v, nil
		}
		inner := v.Elem()
		if isNonFinite(inner) {
			return reflect.Zero(v.Type()), nil
		}
		r, err := readyValue(inner, key)
		if err != nil {
			return v, err
		}
		out := reflect.New(v.Type()).Elem()
		out.Set(r)
		return out, nil
	case reflect.Struct:
		return readyStruct(v, key)
	case reflect.Slice:
		if v.Type().Elem().Kind() == reflect.Uint8 {
			return v, nil // []byte is base64 text, not a list
		}
		if v.IsNil() {
			return reflect.MakeSlice(v.Type(), 0, 0), nil
		}
		out := reflect.MakeSlice(v.Type(), v.Len(), v.Len())
		for i := range v.Len() {
			r, err := readyValue(v.Index(i), fmt.Sprintf("%s[%d]", key, i))
			if err != nil {
				return v, err
			}
			out.Index(i).Set(r)
		}
		return out, nil
	case reflect.Map:
		if v.IsNil() {
			return reflect.MakeMap(v.Type()), nil
		}
		out := reflect.MakeMapWithSize(v.Type(), v.Len())
		iter := v.MapRange()
		for iter.Next() {
			r, err := readyValue(iter.Value(), fmt.Sprintf("%s[%v]", key, iter.Key()))
			if err != nil {
				return v, err
			}
			out.SetMapIndex(iter.Key(), r)
		}
		return out, nil
	}
	return v, nil
}

func readyPointer(v reflect.Value, key string) (reflect.Value, error) {
	if v.IsNil() {
		return v, nil
	}
	if isNonFinite(v.Elem()) {
		return reflect.Zero(v.Type()), nil
	}
	if v.Elem().Kind() != reflect.Struct || implementsMarshaler(v.Type()) {
		return v, nil
	}
	r, err := readyStruct(v.Elem(), key)
	if err != nil {
		return v, err
	}
	p := reflect.New(r.Type())
	p.Elem().Set(r)
	return p, nil
}

func readyStruct(v reflect.Value, key string) (reflect.Value, error) {
	if implementsMarshaler(v.Type()) {
		return v, nil
	}
	out := reflect.New(v.Type()).Elem()
	out.Set(v)
	t := v.Type()
	for i := range t.NumField() {
		f := t.Field(i)
		name, encoded := jsonFieldName(f)
		if !encoded {
			continue
		}
		field := v.Field(i)
		if f.Anonymous && field.Kind() == reflect.Pointer && field.IsNil() && field.Type().Elem().Kind() == reflect.Struct {
			field = reflect.New(field.Type().Elem())
		}
		fieldKey := key
		if !f.Anonymous {
			fieldKey = joinKey(key, name)
		}
		r, err := readyValue(field, fieldKey)
		if err != nil {
			return v, err
		}
		out.Field(i).Set(r)
	}
	return out, nil
}

// jsonFieldName returns the key encoding/json uses for f and whether the
// field is encoded at all.
func jsonFieldName(f reflect.StructField) (string, bool) {
	if !f.IsExported() {
		return "", false // copied as it is; reflection cannot set it
	}
	tag := f.Tag.Get("json")
	if tag == "-" {
		return "", false
	}
	name, _, _ := strings.Cut(tag, ",")
	if name == "" {
		name = f.Name
	}
	return name, true
}

func isNonFinite(v reflect.Value) bool {
	if k := v.Kind(); k != reflect.Float32 && k != reflect.Float64 {
		return false
	}
	f := v.Float()
	return math.IsNaN(f) || math.IsInf(f, 0)
}

var marshalerType = reflect.TypeFor[json.Marshaler]()

func implementsMarshaler(t reflect.Type) bool {
	return t.Implements(marshalerType) || reflect.PointerTo(t).Implements(marshalerType)
}

func joinKey(parent, name string) string {
	if parent == "" {
		return name
	}
	return parent + "." + name
}

func keyName(key string) string {
	if key == "" {
		return "value"
	}
	return "key " + key
}

package api

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"maps"
	"math"
	"reflect"
	"slices"
	"strings"
)

// present reports whether a raw key was given with a value other than null.
func present(raw json.RawMessage) bool {
	t := bytes.TrimSpace(raw)
	return len(t) > 0 && !bytes.Equal(t, []byte("null"))
}

// decodeStrict decodes raw into dst, rejecting unknown fields; errors name
// the field under key.
func decodeStrict(key string, raw json.RawMessage, dst any) error {
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.DisallowUnknownFields()
	err := dec.Decode(dst)
	if err == nil {
		if _, extra := dec.Token(); extra != io.EOF {
			return fieldErr(key, "unexpected text after the object")
		}
		return nil
	}
	// where finds the precise path of the problem in the request.
	where := func(fallback string) string {
		var tree any
		if json.Unmarshal(raw, &tree) == nil {
			if at := badField(reflect.TypeOf(dst).Elem(), tree, key); at != "" {
				return at
			}
		}
		return fallback
	}
	var te *json.UnmarshalTypeError
	if errors.As(err, &te) {
		field := key
		if te.Field != "" {
			field += "." + te.Field
		}
		return fieldErr(where(field), "want %s, not a JSON %s", jsonType(te.Type.String()), te.Value)
	}
	msg := err.Error()
	if name, ok := strings.CutPrefix(msg, "json: unknown field "); ok {
		return fieldErr(where(key), "unknown field %s", name)
	}
	return fieldErr(key, "not valid JSON for this key: %s", strings.TrimPrefix(msg, "json: "))
}

// badField walks a decoded JSON tree against the Go type it was meant for
// and returns the path of the first problem: the object holding a key the
// type does not have, or a value of the wrong JSON type; "" when it finds
// none. (encoding/json names an unknown key but not where it is, and
// leaves map keys and array indices out of a type error's path.)
func badField(t reflect.Type, v any, path string) string {
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if v == nil {
		return ""
	}
	switch t.Kind() {
	case reflect.Struct:
		obj, ok := v.(map[string]any)
		if !ok {
			return path
		}
		fields := map[string]reflect.Type{}
		for i := range t.NumField() {
			f := t.Field(i)
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			if name == "" {
				name = f.Name
			}
			fields[name] = f.Type
		}
		for _, k := range slices.Sorted(maps.Keys(obj)) {
			ft, ok := fields[k]
			if !ok {
				return path
			}
			if at := badField(ft, obj[k], path+"."+k); at != "" {
				return at
			}
		}
	case reflect.Map:
		obj, ok := v.(map[string]any)
		if !ok {
			return path
		}
		for _, k := range slices.Sorted(maps.Keys(obj)) {
			if at := badField(t.Elem(), obj[k], path+"."+k); at != "" {
				return at
			}
		}
	case reflect.Slice:
		if t.Elem().Kind() == reflect.Uint8 { // json.RawMessage: anything goes
			return ""
		}
		arr, ok := v.([]any)
		if !ok {
			return path
		}
		for i, e := range arr {
			if at := badField(t.Elem(), e, fmt.Sprintf("%s[%d]", path, i)); at != "" {
				return at
			}
		}
	case reflect.String:
		if _, ok := v.(string); !ok {
			return path
		}
	case reflect.Bool:
		if _, ok := v.(bool); !ok {
			return path
		}
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		x, ok := v.(float64)
		if !ok || x != math.Trunc(x) || x < 0 && t.Kind() >= reflect.Uint {
			return path
		}
	case reflect.Float32, reflect.Float64:
		if _, ok := v.(float64); !ok {
			return path
		}
	}
	return ""
}

func jsonType(goType string) string {
	switch {
	case strings.HasPrefix(goType, "map["):
		return "an object"
	case strings.HasPrefix(goType, "[]"):
		return "an array"
	case goType == "string":
		return "a string"
	case goType == "bool":
		return "true or false"
	case strings.Contains(goType, "int"):
		return "a whole number"
	case strings.Contains(goType, "float"):
		return "a number"
	}
	return "an object"
}

func trimPkg(err error) string { return strings.TrimPrefix(err.Error(), "eseries: ") }

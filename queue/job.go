package queue

import (
	"bytes"
	"encoding/gob"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"reflect"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/rules"
)

// SpecRef is the spec a job is judged by, carried with the job so that
// workers need no spec files: a built-in id, or the text of a TOML spec
// with the file name it had (which names it in error messages).
type SpecRef struct {
	// Builtin is a built-in spec id; empty when TOML is set.
	Builtin string `json:"builtin,omitempty"`
	// File is the spec file's name on the submitting machine.
	File string `json:"file,omitempty"`
	// TOML is the spec file's text.
	TOML string `json:"toml,omitempty"`
}

// Resolve parses or looks up the spec.
func (s SpecRef) Resolve() (*rules.Spec, error) {
	if s.TOML != "" {
		return rules.Parse(s.File, []byte(s.TOML))
	}
	if s.Builtin == "" {
		return nil, errors.New("the job names no spec")
	}
	return rules.Lookup(s.Builtin)
}

// Job is one file to judge. It is JSON on the wire, one message on the
// batch's job subject with message id "batch.index".
type Job struct {
	// Batch is the batch id; Index the file's place in the batch.
	Batch string `json:"batch"`
	Index int    `json:"index"`
	// Name is the file as the submitter named it: the record's path and
	// every error message name it.
	Name string `json:"name"`
	// Object is the audio object's name (ObjectName of its SHA-256).
	Object string `json:"object"`
	// Size is the audio's length in bytes.
	Size int64 `json:"size"`
	// Explicit is true when the file was named rather than found in a
	// folder: a file that is not audio is then an error, not a skip.
	Explicit bool    `json:"explicit"`
	Spec     SpecRef `json:"spec"`
	// Layout, KeepSeries and SkipMD5 are the measurement options of the
	// submitting command.
	Layout     []string `json:"layout,omitempty"`
	KeepSeries bool     `json:"keep_series,omitempty"`
	SkipMD5    bool     `json:"skip_md5,omitempty"`
}

// msgID is the JetStream message id of a job and of its result.
func msgID(batch string, index int) string { return fmt.Sprintf("%s.%d", batch, index) }

// decodeJob reads a job message.
func decodeJob(data []byte) (Job, error) {
	var j Job
	if err := json.Unmarshal(data, &j); err != nil {
		return j, fmt.Errorf("job message: %w", err)
	}
	if !validBatch(j.Batch) || j.Index < 0 || j.Name == "" || j.Object == "" {
		return j, fmt.Errorf("job message: batch %q, index %d, name %q, object %q: incomplete", j.Batch, j.Index, j.Name, j.Object)
	}
	return j, nil
}

// Outcome is the result of one job. It is JSON on the wire, one message on
// the batch's result subject with the job's message id, so a result
// published twice (a redelivered job) is stored once.
type Outcome struct {
	Batch string `json:"batch"`
	Index int    `json:"index"`
	// Result is the judgement; its Measurement's Err is not carried (only
	// its text, Error). A figure that is not a finite number travels as
	// null, as in kweigh's JSON report.
	Result *rules.Result `json:"result"`
	// Series is the measurement's time series when the job asked for it,
	// gob-encoded: it holds -Inf for silent blocks, which JSON cannot.
	Series []byte `json:"series,omitempty"`
	// Skipped marks a file found in a folder that is not audio.
	Skipped bool `json:"skipped,omitempty"`
	// Spec is the job's spec, so a collector can draw its limits.
	Spec SpecRef `json:"spec"`
	// Worker names the worker that judged it (empty for a record the
	// submitter made itself); Deliveries is how often the job had been
	// delivered then.
	Worker     string `json:"worker,omitempty"`
	Deliveries int    `json:"deliveries,omitempty"`
}

// newOutcome fills an outcome from a record's result and series.
func newOutcome(batch string, index int, r *rules.Result, skipped bool, spec SpecRef) (Outcome, error) {
	o := Outcome{Batch: batch, Index: index, Skipped: skipped, Spec: spec}
	if skipped && r == nil {
		return o, nil
	}
	if r == nil || r.Measurement == nil {
		return o, fmt.Errorf("job %s: no result to send", msgID(batch, index))
	}
	m := *r.Measurement
	if m.Series != nil {
		var buf bytes.Buffer
		if err := gob.NewEncoder(&buf).Encode(m.Series); err != nil {
			return o, fmt.Errorf("job %s: loudness series: %w", msgID(batch, index), err)
		}
		o.Series = buf.Bytes()
	}
	m.Err, m.Series = nil, nil
	c := *r
	c.Measurement = &m
	o.Result = &c
	return o, nil
}

func encodeOutcome(o Outcome) ([]byte, error) {
	if o.Result != nil {
		nullNonFinite(reflect.ValueOf(o.Result))
	}
	data, err := json.Marshal(o)
	if err != nil {
		return nil, fmt.Errorf("result of job %s: %w", msgID(o.Batch, o.Index), err)
	}
	return data, nil
}

// nullNonFinite sets pointers and interfaces holding NaN or ±Inf to nil,
// walking structs, slices and pointers (the result's own data, no cycles).
func nullNonFinite(v reflect.Value) {
	switch v.Kind() {
	case reflect.Pointer:
		if v.IsNil() {
			return
		}
		if e := v.Elem(); e.Kind() == reflect.Float64 || e.Kind() == reflect.Float32 {
			if f := e.Float(); (math.IsNaN(f) || math.IsInf(f, 0)) && v.CanSet() {
				v.Set(reflect.Zero(v.Type()))
			}
			return
		}
		nullNonFinite(v.Elem())
	case reflect.Interface:
		if v.IsNil() {
			return
		}
		if e := v.Elem(); e.Kind() == reflect.Float64 || e.Kind() == reflect.Float32 {
			if f := e.Float(); (math.IsNaN(f) || math.IsInf(f, 0)) && v.CanSet() {
				v.Set(reflect.Zero(v.Type()))
			}
			return
		}
	case reflect.Struct:
		for i := 0; i < v.NumField(); i++ {
			if v.Type().Field(i).IsExported() {
				nullNonFinite(v.Field(i))
			}
		}
	case reflect.Slice, reflect.Array:
		for i := 0; i < v.Len(); i++ {
			nullNonFinite(v.Index(i))
		}
	}
}

// decodeOutcome reads a result message and restores the measurement's
// error value and series.
func decodeOutcome(data []byte) (Outcome, *loudness.Series, error) {
	var o Outcome
	if err := json.Unmarshal(data, &o); err != nil {
		return o, nil, fmt.Errorf("result message: %w", err)
	}
	if o.Skipped && o.Result == nil {
		return o, nil, nil
	}
	if o.Result == nil || o.Result.Measurement == nil {
		return o, nil, fmt.Errorf("result message for job %s: no result", msgID(o.Batch, o.Index))
	}
	m := o.Result.Measurement
	if m.Error != "" {
		m.Err = errors.New(m.Error)
	}
	var series *loudness.Series
	if len(o.Series) > 0 {
		series = new(loudness.Series)
		if err := gob.NewDecoder(bytes.NewReader(o.Series)).Decode(series); err != nil {
			return o, nil, fmt.Errorf("result message for job %s: loudness series: %w", msgID(o.Batch, o.Index), err)
		}
		m.Series = series
	}
	return o, series, nil
}

// NamedSpec is how the spec a user named (a built-in id or a TOML file)
// travels: the id, or the file's text.
func NamedSpec(name string) (SpecRef, error) {
	if _, err := rules.Lookup(name); err == nil {
		return SpecRef{Builtin: name}, nil
	}
	text, err := readSpecText(name)
	if err != nil {
		return SpecRef{}, err
	}
	return SpecRef{File: name, TOML: text}, nil
}

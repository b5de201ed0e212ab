// Package engine judges delivered audio files: it is the one place that
// turns "this file (or this folder, or this pattern)" into check records,
// for every front end kweigh has: the check and measure commands, the hot
// folder watcher, the upload server and any queue worker.
//
// It exists because the step between the library packages and a front end
// has no other home: package rules must not decode, package measure must
// not judge, and a command package is wiring only. Everything here is a
// plain function taking a context.Context and an options struct; there is
// no package state, so two judgements with different options can run at the
// same time.
//
// The pieces, in the order a front end uses them:
//
//   - Collect turns command-line style arguments (files, folders walked
//     recursively, glob patterns) into Targets in a stable order.
//   - FindSpec (or a Specs cache for a batch) resolves the delivery spec of
//     a file: the nearest kweigh.toml from the file's folder upwards.
//   - Judge, JudgeStream and JudgeTarget measure one file and judge it
//     against its spec, returning a Record.
//   - Run does a set of Targets on N workers and hands each Record on, in
//     target order or as each finishes.
package engine

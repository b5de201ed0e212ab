// Package serve is kweigh's upload gate: an HTTP service that judges an
// audio file against a delivery spec as it is delivered, so a media
// pipeline (a podcast host's ingest, a broadcaster's delivery portal, an
// asset manager) can refuse a non-compliant file at upload time, with the
// reason, and a person can drop a file on a page and read the verdict.
//
// It is a front end only: measuring and judging are the library's
// (package measure per ITU-R BS.1770 and EBU Tech 3341/3342, package rules
// for the verdict, package reports for the JSON object and
// reports/htmlpage for the QC page), reached through a Judge function. What
// lives here is what an unattended network service needs and the command
// line does not: bounded memory per request (bodies are streamed to a
// private temporary file, never held), a bounded worker pool and queue,
// bearer tokens, upload limits detected while reading, timeouts against
// slow clients, metrics in the Prometheus text format, structured logs and
// a graceful shutdown.
//
// A pass is not a broadcaster's or regulator's acceptance: local regulation
// and the receiving party's own QC decide.
package serve

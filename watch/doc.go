// Package watch is kweigh's hot folder: it watches inbox folders, takes each
// delivery once it is complete, judges it against its spec, writes a report
// pair (the check record as JSON and the HTML QC page), moves the file to a
// passed or failed folder and tells a webhook, keeping every step in an
// embedded SQLite ledger so that a process killed at any moment resumes
// where it stopped.
//
// Nobody watches a hot folder: files arrive half-written, are renamed in by
// upload tools, replaced, deleted, or are unreadable; the process is killed
// by a deploy or a power cut. The rules that follow from that:
//
//   - File-system events (fsnotify) are only hints that something changed; a
//     periodic rescan of the whole inbox is the truth, and with Poll set it
//     is the only source (network shares often deliver no events).
//   - A file is taken only when its size and modification time have stayed
//     the same for the settle time and its name is not a temporary one, so a
//     file still being written is never judged on a prefix.
//   - The ledger holds one row per file version (path, size, modification
//     time, content fingerprint). A row moves seen → settling → judging →
//     judged → placed, and every transition is committed before the step
//     that follows acts, so after a crash a file caught mid-judgement is
//     judged again, one caught mid-move is finished, and none is judged
//     twice. Every step is safe to repeat: report files are written to a
//     temporary name and renamed, and a move whose destination already
//     exists with the right size is done.
//   - Nothing is ever overwritten: a name clash in the passed or failed
//     folder gets a numbered suffix.
//   - Webhook notifications go through an outbox in the ledger and are
//     retried with backoff, across restarts, until the receiver takes them.
//
// The package judges through a JudgeFunc, so the command line decides how a
// file is measured and which spec applies; CheckJudge is the judge of
// `kweigh check`.
package watch

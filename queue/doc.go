// Package queue hands checks to other machines through NATS JetStream: a
// submitter puts each file's audio in JetStream's object store (named by its
// SHA-256, so audio already there is not sent again) and one job per file in
// a work-queue stream; workers pull jobs, judge the audio with package engine
// against the spec carried in the job, publish the result to a results
// stream and only then acknowledge the job.
//
// It is its own package because it is the one place that knows the queue's
// names, message layouts and delivery rules; the command line (cmd/kweigh)
// only wires flags to it, and package engine stays free of any transport.
// Nothing here schedules work itself: JetStream hands out jobs, redelivers
// the job of a worker that stopped acknowledging it, and removes each job
// once acknowledged.
//
// Delivery guarantees, in short: every job is judged at least once and its
// result is taken exactly once (results carry a message id per job, and
// Wait keeps the first result of each job); a job whose workers keep dying
// before they finish is ended by the next worker as an error result after
// Config.MaxDeliveries deliveries.
package queue

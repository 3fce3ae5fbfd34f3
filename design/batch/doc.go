// Package batch designs a gate set for a whole device: every gate of a
// list for every qubit (or site) of a calibration table, on one machine or
// as a Slurm job array.
//
// # Inputs
//
// A base spec (a loopgate design spec), a calibration table and a list of
// named target gates. The table is CSV with a header row. One column,
// called "qubit" or "site", names each row's qubit: up to 40 letters,
// digits and _ . + -, unique regardless of letter case. Every other column
// names a field of the base spec by its path, as the spec parser names
// fields ("hardware.max_rabi", "scheme.decay.e", "hardware.max_rabi.p0",
// "scheme.channels[1].factor"); the field must be present in the base
// spec, which gives its default. A cell is written as in a spec ("18.5
// MHz", "0.012", "2 %", or a flow list "[20 MHz, 18 MHz]"); an empty cell
// keeps the base value. Rows are numbered as a spreadsheet shows them: the
// header is row 1.
//
// # Plan
//
// Plan writes each task's spec by copying the base spec's YAML node tree,
// writing the row's cells at their paths (each with a comment naming the
// row) and setting target.gate, and parses it as "table.csv row 7, gate
// H". Every row is checked with every gate before any file is written; a
// *PlanError lists every problem with its row, column, cell and spec
// field. The work folder then holds:
//
//	plan.json       the Manifest: inputs (name, SHA-256), gates, qubits, tasks
//	inputs/         copies of the base spec and the table
//	specs/ID.yaml   each task's spec (ID is qubit-gate, as t3-SX)
//	tasks/ID/       a finished task: waveform.json, waveform.csv, waveform.npy,
//	                loop.json, report.html and task.json (a TaskResult)
//	failures/ID.json a failed task: TaskFailure (message, exit code)
//	scratch/ID/     a task at work (locked with flock; empty otherwise)
//	logs/           Slurm's output, one file per array task
//	cost.json       the measured cost of one task (Cost)
//	array.sbatch    the Slurm batch script
//	summary.csv, summary.json, index.html   written by Collect
//
// # Run
//
// Run designs tasks into scratch/ID/out and renames the folder to
// tasks/ID when every file is complete. A finished task is skipped; a task
// locked by another process is left to it; an interrupted or killed task
// leaves no output and runs again next time. A task's files do not depend
// on how it was run (alone, in a pool of workers or in an array task):
// they are a function of its spec bytes.
//
// # Collect
//
// Collect writes summary.json (Summary), summary.csv (one line per task;
// columns in csvHeader order) and index.html (a figure of the error-model
// infidelity per qubit and gate, and a table linking every report).
//
// All calls into the design pipeline are in pipeline.go.
package batch

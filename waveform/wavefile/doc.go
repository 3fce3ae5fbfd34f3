// Package wavefile reads and writes loopgate's waveform and loop files and
// exports samples as CSV and NPY.
//
// File.WriteJSON writes the self-contained waveform file described by
// schemas.Waveform; WriteCSV and WriteNPY export the samples; LoopFile
// holds a loop as sampled unit-scale points (schemas.Loop). ReadWaveform
// and ReadLoop bound the file size, validate against the schema, then check
// the contents; their errors are *FileError values naming the file and a
// JSON pointer. Writers take an io.Writer and never touch the file system.
package wavefile

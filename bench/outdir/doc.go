// Package outdir writes fringe's output so that a crash, a kill or an
// error never leaves a file or directory that looks complete but is not.
//
// Write renders the files of a whole output directory (a run directory, an
// assessment) concurrently into memory (Render, RenderLimit: every file
// and every format of a figure its own piece of work, at most a given
// number at a time), writes them into a temporary
// directory beside the target (TempBeside) and renames it into place
// (Replace); an existing directory is replaced only then. WriteAtomic
// writes one file under a temporary name and renames it; WriteExclusive
// does the same but fails with fs.ErrExist if the file is already there
// (two processes racing for one partial run directory). SafeName turns a
// name into a file-name fragment.
//
// Imports: results (figures render themselves). It must never import the
// other bench packages.
package outdir

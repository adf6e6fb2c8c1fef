// Package datasets provides the labelled data fringe benchmarks on: embedded
// open datasets with their provenance, CSV import, seeded synthetic
// generators, class and feature subsets, and preprocessing pipelines.
//
// # Datasets
//
// A Dataset is a table of numeric features X (one row per instance), class
// indices Y into Classes, and Rows, the 0-based index of each instance in
// the dataset as loaded. Rows survive every subset, selection and dropped
// row, so outputs can always name the original instance. Class order is
// part of the data: the embedded sets use the order of the source file's
// label codes, CSV files the order in which labels first appear, synthetic
// sets the order their generator documents. Model tie rules refer to it.
//
// # Embedded and synthetic sets
//
// Load(name) returns a fresh copy of a dataset by name; Names and
// Provenances list them in a fixed order:
//
//	iris            150 x 4,  setosa/versicolor/virginica (50/50/50)
//	wine            178 x 13, class_0/class_1/class_2 (59/71/48)
//	breast-cancer   569 x 30, malignant/benign (212/357)
//	cats            144 x 2,  F/M (47/97)
//	penguins        342 x 4,  Adelie/Gentoo/Chinstrap (151/123/68)
//	glass           214 x 9,  six glass types (70/76/17/13/9/29)
//	segment        2310 x 19, seven image regions (330 each)
//	ionosphere      351 x 34, b/g (126/225)
//	digits         1797 x 64, 0-9 (174-183 each)
//	synth-cullet    210 x 5,  flint/green/amber (70/70/70), invented
//	synth-bearings  270 x 4,  sound/worn (180/90), invented
//
// iris, wine, breast-cancer and digits are the files of scikit-learn 1.2.1
// (Debian python3-sklearn 1.2.1+dfsg-1), embedded byte for byte; glass,
// segment and ionosphere come from Debian's weka 3.6.14-3 (ARFF), penguins
// from r-cran-palmerpenguins 0.1.1-1 and cats from r-cran-mass 7.3-58.2-1,
// converted by scripts/ref_assess_datasets.py with the feature values
// copied verbatim. Provenance gives origin, citation, licence, file name and
// the SHA-256 of the embedded bytes.
// Feature names are scikit-learn's feature_names. iris is the corrected
// variant of Fisher's data; IrisUCIVariant rebuilds the UCI iris.data
// variant, which differs in two rows.
//
// The synthetic sets are invented for the demo (Provenance.Synthetic is
// true). In synth-cullet the class is carried by the direction of the
// feature vector and its norm is a nuisance, so unit-norm scaling helps; in
// synth-bearings much of the class information is the norm, which unit-norm
// scaling discards and the norm-keeping "lift" step keeps. Load uses a
// fixed built-in seed; Synthetic draws another size from a caller's
// *rand.Rand. Same name, size and generator state give identical data.
//
// # CSV files
//
// LoadCSV and ReadCSV read a header row and numeric feature columns with one
// string label column (the last unless CSVOptions.Label names another); the
// delimiter (',', ';' or tab) is detected from the header unless given.
// Every problem is a *CSVError naming the file, 1-based line and column and
// wrapping a sentinel (ErrEmptyFile, ErrNoRows, ErrRaggedRow, ErrNonNumeric,
// ErrMissingValue, ErrNaNOrInf, ErrDuplicateColumn, ErrEmptyColumnName,
// ErrUnknownColumn, ErrNoFeatures, ErrTooFewClasses, ErrCSVSyntax). With
// CSVOptions.DropInvalid, rows with bad values are skipped and listed in
// Dataset.Dropped instead. No feature value of a loaded dataset is ever NaN
// or infinite.
//
// # Subsets
//
// Subset keeps chosen classes (by name, in the dataset's class order, Y
// renumbered) and features (by name or 0-based index); Select picks rows by
// position. Both copy, so the result shares nothing mutable with the input.
//
// # Preprocessing
//
// A Pipeline (ParsePipeline("std+l2")) is a sequence of steps fitted on the
// training rows of a split and applied to training and test rows; see
// Pipeline and StepInfos.
//
// # Errors and panics
//
// Bad user input (names, files, options) returns an error prefixed
// "datasets: "; nothing panics on user input.
// Select panics on an out-of-range row position (a programming error);
// package initialisation panics if an embedded file is missing (a build
// defect), and Provenances if a built-in generator fails with its built-in
// seed and size (a broken internal invariant).
package datasets

// Package agreement measures how far two independent labelers agree on the
// doubled items of an audit and turns double labels and adjudications into
// the final reference label of every item.
//
// It computes, for any number of classes, the agreement table, the observed
// and chance agreement, Cohen's kappa with the large-sample standard error
// of Fleiss, Cohen & Everitt (1969) and Gwet's AC1 with the variance of
// Gwet (2008), each with a normal-theory confidence interval; it reads the
// adjudication file (see ReadAdjudications) and checks it against the
// ledger and both worksheets (see Resolve).
//
// The package computes and never prints; it reads no clock and no global
// randomness.
package agreement

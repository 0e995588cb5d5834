// Package feedback couples what star particles release into the gas around
// them: it shares each release over the neighbouring gas with positive,
// isotropy-corrected weights, splits it into mass, species, momentum and
// heat according to a scheme, and writes deposit records and a ledger in
// which everything that went in is accounted for.
package feedback

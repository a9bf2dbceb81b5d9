package report

// PairJob is one paired comparison a run makes: model Model on extent
// Extent minus model OtherModel on extent OtherExtent. A run writes one
// Paired record per metric of each, always one for "auc".
type PairJob struct {
	Kind              PairKind
	Model, Extent     string
	OtherModel, Other string
}

// PairJobs lists the paired comparisons a run makes, in the order
// results.json keeps them: every model and null on every other extent
// minus itself on the reference extent, then on each extent every pair of
// models, then every model minus every null; each only where both sides
// are scored. ids are the family's extent ids in family order. It is the
// one place that says which comparisons exist: the run makes them, and the
// report's check of a results file (Validate) requires them, so that a
// paired list emptied by hand is refused rather than read as "no
// difference could be formed".
func PairJobs(models []Model, ids []string, scores []Score) []PairJob {
	isScored := map[[2]string]bool{}
	for _, sc := range scores {
		if sc.Scored {
			isScored[[2]string{sc.Model, sc.Extent}] = true
		}
	}
	scored := func(model, ext string) bool { return isScored[[2]string{model, ext}] }
	var plain, nulls []Model
	for _, m := range models {
		if m.IsNull() {
			nulls = append(nulls, m)
		} else {
			plain = append(plain, m)
		}
	}
	// The extents something is scored on, and the reference of the
	// differences between extents: the base extent, or the first extent
	// some model (else some null) is scored on when no model is scored on
	// the base. It is the report's reference (its analysis reads models
	// only): an extent where only a null is scored (every model constant
	// there, or without data) would otherwise be the reference here and
	// not in the report, which then found no difference of the models to
	// judge.
	scoredBy := func(ms []Model) []string {
		var out []string
		for _, id := range ids {
			for _, m := range ms {
				if scored(m.Name, id) {
					out = append(out, id)
					break
				}
			}
		}
		return out
	}
	okIDs := scoredBy(models)
	refIDs := scoredBy(plain)
	if len(refIDs) == 0 {
		refIDs = okIDs
	}
	base := BaseExtent(refIDs)
	var jobs []PairJob
	for _, m := range models {
		if !scored(m.Name, base) {
			continue
		}
		for _, id := range okIDs {
			if id != base && scored(m.Name, id) {
				jobs = append(jobs, PairJob{PairedKindExtent, m.Name, id, m.Name, base})
			}
		}
	}
	for _, id := range okIDs {
		for i, a := range plain {
			for _, b := range plain[i+1:] {
				if scored(a.Name, id) && scored(b.Name, id) {
					jobs = append(jobs, PairJob{PairedKindModel, a.Name, id, b.Name, id})
				}
			}
		}
	}
	for _, id := range okIDs {
		for _, a := range plain {
			for _, n := range nulls {
				if scored(a.Name, id) && scored(n.Name, id) {
					jobs = append(jobs, PairJob{PairedKindNull, a.Name, id, n.Name, id})
				}
			}
		}
	}
	return jobs
}

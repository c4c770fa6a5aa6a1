//! Reading many whole records in order, a page at a time, for exports; the
//! records' forms (JSON Lines, CSV) are the batch domain's ([`crate::batch::export`]).

use std::io::Write;

use super::Store;
use super::error::{Result, StoreError};
use crate::batch::export::{self, Format};
use crate::batch::{Batch, BatchFilter};

impl Store {
    /// Calls `each` for every batch matching `filter`, newest first, reading one
    /// page of records at a time; returns how many were passed on.
    pub fn each_batch(
        &self,
        filter: &BatchFilter,
        mut each: impl FnMut(&Batch) -> Result<()>,
    ) -> Result<usize> {
        const PAGE: usize = 500;
        let mut page = filter.clone();
        let mut done = 0;
        loop {
            let want = if filter.limit == 0 {
                PAGE
            } else {
                PAGE.min(filter.limit - done)
            };
            if want == 0 {
                return Ok(done);
            }
            page.limit = want;
            let rows = self.list_batches(&page)?;
            for row in &rows {
                let batch = self.require(&row.code)?;
                each(&batch)?;
                done += 1;
            }
            match rows.last() {
                Some(last) if rows.len() == want => page.after = Some(last.cursor.clone()),
                _ => return Ok(done),
            }
        }
    }
}

impl Store {
    /// Every measured figure of the batches `filter` selects that has a
    /// prediction, oldest first, as [`crate::batch::compare::measured_pairs`]
    /// pairs them (of `style` and `kind` when given, with the corrections of
    /// `setting`).
    pub fn measured_pairs(
        &self,
        filter: &BatchFilter,
        style: Option<crate::model::Style>,
        kind: Option<crate::batch::MeasurementKind>,
        setting: &crate::batch::compare::Setting<'_>,
    ) -> Result<Vec<(crate::measure::Comparison, Option<f64>)>> {
        let mut pairs = Vec::new();
        let mut now = crate::batch::compare::Recomputed::new();
        self.each_batch(filter, |b| {
            pairs.extend(crate::batch::compare::measured_pairs(
                b, setting, style, kind, &mut now,
            ));
            Ok(())
        })?;
        pairs.reverse();
        Ok(pairs)
    }

    /// Writes every batch matching `filter` to `out` in `format` (the forms are
    /// the batch domain's, [`crate::batch::export`]); returns how many were written.
    pub fn export(
        &self,
        filter: &BatchFilter,
        format: Format,
        out: &mut dyn Write,
    ) -> Result<usize> {
        let io = |source| StoreError::Io {
            path: "the export output".into(),
            source,
        };
        export::write_start(format, out).map_err(io)?;
        self.each_batch(filter, |b| export::write_record(format, b, out).map_err(io))
    }
}

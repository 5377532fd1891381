//! Arrow in and out through the Arrow PyCapsule interface, so that any
//! Arrow producer (pyarrow, polars, pandas ≥ 2.2, DuckDB results) hands
//! over its coordinate columns, and any Arrow consumer takes a result's
//! rows, without this package depending on any of them.
//!
//! In: an object's `__arrow_c_stream__()` gives a stream of record
//! batches; the two coordinate columns are read as f64 (integers and
//! f32 widened exactly), and a missing value is refused, never skipped.
//! Out: [`ArrowTable`] offers `__arrow_c_stream__` over one record batch.

use crate::errors::{setting, to_py};
use arrow_array::cast::AsArray;
use arrow_array::ffi::{FFI_ArrowArray, FFI_ArrowSchema, from_ffi};
use arrow_array::ffi_stream::{FFI_ArrowArrayStream, RecordBatchStreamReader};
use arrow_array::types::{
    Float32Type, Float64Type, Int8Type, Int16Type, Int32Type, Int64Type, UInt8Type, UInt16Type,
    UInt32Type, UInt64Type,
};
use arrow_array::{
    Array, ArrayRef, BooleanArray, Float64Array, Int64Array, RecordBatch, RecordBatchIterator,
    RecordBatchReader, StringArray, make_array,
};
use arrow_schema::{ArrowError, DataType, Field, Schema};
use pyo3::prelude::*;
use pyo3::types::{PyBytes, PyCapsule};
use std::sync::Arc;

/// The capsule name the Arrow PyCapsule interface gives a stream.
const STREAM: &std::ffi::CStr = c"arrow_array_stream";

/// A refused input in the command line's words, as a Python exception.
fn pyerr(subject: &str, what: &str, hint: &str) -> PyErr {
    to_py(setting(subject, what, hint))
}

/// Read the stream an object offers.
fn stream_of(obj: &Bound<'_, PyAny>) -> PyResult<RecordBatchStreamReader> {
    let capsule = obj.call_method0("__arrow_c_stream__")?;
    let capsule = capsule.cast::<PyCapsule>().map_err(|_| {
        pyerr(
            "points",
            "__arrow_c_stream__() did not return a capsule",
            "pass a pyarrow table, a polars or pandas data frame, or an (n, 2) array",
        )
    })?;
    let ptr = capsule.pointer_checked(Some(STREAM))?;
    // SAFETY: the capsule is named `arrow_array_stream`, so by the Arrow
    // PyCapsule interface it points to an FFI_ArrowArrayStream; from_raw
    // moves the stream out and leaves a released one behind, which the
    // capsule's own destructor then leaves alone.
    #[allow(unsafe_code)]
    unsafe { RecordBatchStreamReader::from_raw(ptr.cast::<FFI_ArrowArrayStream>().as_ptr()) }
        .map_err(|e| arrow_error("points", e))
}

/// Read the one record batch (a struct array of named columns) an object
/// offers through `__arrow_c_array__` (a pyarrow RecordBatch or
/// StructArray, any producer of a single batch).
fn batch_of(obj: &Bound<'_, PyAny>) -> PyResult<Box<dyn RecordBatchReader>> {
    let pair = obj.call_method0("__arrow_c_array__")?;
    let (schema, array): (Bound<'_, PyAny>, Bound<'_, PyAny>) = pair.extract()?;
    let not_capsules = || {
        pyerr(
            "points",
            "__arrow_c_array__() did not return two capsules",
            "pass a pyarrow table, a polars or pandas data frame, or an (n, 2) array",
        )
    };
    let schema = schema.cast::<PyCapsule>().map_err(|_| not_capsules())?;
    let array = array.cast::<PyCapsule>().map_err(|_| not_capsules())?;
    let schema_ptr = schema.pointer_checked(Some(c"arrow_schema"))?;
    let array_ptr = array.pointer_checked(Some(c"arrow_array"))?;
    // SAFETY: by the Arrow PyCapsule interface the capsules named
    // `arrow_schema` and `arrow_array` point to an FFI_ArrowSchema and an
    // FFI_ArrowArray. The schema is only borrowed (its capsule releases
    // it); the array is moved out, leaving a released one behind for its
    // capsule's destructor.
    #[allow(unsafe_code)]
    let data = unsafe {
        let schema = &*schema_ptr.cast::<FFI_ArrowSchema>().as_ptr();
        let array = FFI_ArrowArray::from_raw(array_ptr.cast::<FFI_ArrowArray>().as_ptr());
        from_ffi(array, schema)
    }
    .map_err(|e| arrow_error("points", e))?;
    let array = make_array(data);
    let Some(columns) = array.as_struct_opt() else {
        return Err(pyerr(
            "points",
            &format!(
                "an Arrow array of {} has no named columns",
                array.data_type()
            ),
            "pass a table or record batch with x, y (or lon, lat) columns",
        ));
    };
    let batch = RecordBatch::from(columns.clone());
    let schema = batch.schema();
    Ok(Box::new(RecordBatchIterator::new([Ok(batch)], schema)))
}

fn arrow_error(what: &str, e: ArrowError) -> PyErr {
    pyerr(
        what,
        &format!("the Arrow stream could not be read ({e})"),
        "pass a table whose coordinate columns are numbers",
    )
}

/// What [`arrow_points`] gives back: the pair found (if any), the
/// coordinates as bytes, and the column names.
type Found<'py> = (Option<(String, String)>, Bound<'py, PyBytes>, Vec<String>);

/// The first pair of `pairs` (matched without regard to case) that the
/// object's schema has, and its columns as native f64 bytes x0 y0 x1 y1 …
/// `None` and the column names when no pair is there.
#[pyfunction]
pub fn arrow_points<'py>(
    py: Python<'py>,
    obj: &Bound<'py, PyAny>,
    pairs: Vec<(String, String)>,
) -> PyResult<Found<'py>> {
    let reader: Box<dyn RecordBatchReader> = if obj.hasattr("__arrow_c_stream__")? {
        Box::new(stream_of(obj)?)
    } else {
        batch_of(obj)?
    };
    let schema = reader.schema();
    let names: Vec<String> = schema.fields().iter().map(|f| f.name().clone()).collect();
    let find = |want: &str| names.iter().position(|n| n.eq_ignore_ascii_case(want));
    let Some((xi, yi, pair)) = pairs
        .iter()
        .find_map(|(a, b)| Some((find(a)?, find(b)?, (a.clone(), b.clone()))))
    else {
        return Ok((None, PyBytes::new(py, &[]), names));
    };
    // Native f64 bytes, x0 y0 x1 y1 …, written once.
    let mut out: Vec<u8> = Vec::new();
    let mut row = 0usize;
    for batch in reader {
        let batch = batch.map_err(|e| arrow_error("points", e))?;
        let xs = column_f64(batch.column(xi), &names[xi], row)?;
        let ys = column_f64(batch.column(yi), &names[yi], row)?;
        out.reserve(16 * xs.len());
        for (x, y) in xs.into_iter().zip(ys) {
            out.extend_from_slice(&x.to_ne_bytes());
            out.extend_from_slice(&y.to_ne_bytes());
        }
        row += batch.num_rows();
    }
    Ok((Some(pair), PyBytes::new(py, &out), names))
}

/// One column as f64: floats as they are, integers widened (exact below
/// 2⁵³, as any coordinate is). Nulls are refused with the first row's
/// number (`offset` rows came in earlier batches).
fn column_f64(col: &ArrayRef, name: &str, offset: usize) -> PyResult<Vec<f64>> {
    if col.null_count() > 0 {
        let first = (0..col.len()).find(|&i| col.is_null(i)).unwrap_or(0);
        return Err(pyerr(
            "points",
            &format!(
                "column {name} has {} missing value(s), the first in row {}",
                col.null_count(),
                offset + first + 1
            ),
            "drop the rows without coordinates, or fill them, before the call",
        ));
    }
    macro_rules! widen {
        ($t:ty) => {
            col.as_primitive::<$t>()
                .values()
                .iter()
                .map(|&v| v as f64)
                .collect()
        };
    }
    Ok(match col.data_type() {
        DataType::Float64 => col.as_primitive::<Float64Type>().values().to_vec(),
        DataType::Float32 => widen!(Float32Type),
        DataType::Int8 => widen!(Int8Type),
        DataType::Int16 => widen!(Int16Type),
        DataType::Int32 => widen!(Int32Type),
        DataType::Int64 => widen!(Int64Type),
        DataType::UInt8 => widen!(UInt8Type),
        DataType::UInt16 => widen!(UInt16Type),
        DataType::UInt32 => widen!(UInt32Type),
        DataType::UInt64 => widen!(UInt64Type),
        other => {
            return Err(pyerr(
                "points",
                &format!("column {name} holds {other}, not numbers"),
                "convert the coordinate columns to numbers (float64) before the call",
            ));
        }
    })
}

/// A result's rows as one Arrow record batch, offered through
/// `__arrow_c_stream__` (pyarrow.table(), polars.DataFrame() and DuckDB
/// take it without a copy of the numbers).
#[pyclass(module = "patternproof._native", frozen)]
pub struct ArrowTable {
    batch: RecordBatch,
}

#[pymethods]
impl ArrowTable {
    /// Build from `(name, kind, values)` columns; `kind` is `int`,
    /// `float`, `bool` or `str`, and decides the Arrow type even when every
    /// value is missing.
    #[new]
    fn new(columns: Vec<(String, String, Bound<'_, PyAny>)>) -> PyResult<Self> {
        let mut fields = Vec::new();
        let mut arrays: Vec<ArrayRef> = Vec::new();
        for (name, kind, values) in columns {
            let (dt, array): (DataType, ArrayRef) = match kind.as_str() {
                "int" => (
                    DataType::Int64,
                    Arc::new(Int64Array::from(values.extract::<Vec<Option<i64>>>()?)),
                ),
                "float" => (
                    DataType::Float64,
                    Arc::new(Float64Array::from(values.extract::<Vec<Option<f64>>>()?)),
                ),
                "bool" => (
                    DataType::Boolean,
                    Arc::new(BooleanArray::from(values.extract::<Vec<Option<bool>>>()?)),
                ),
                "str" => (
                    DataType::Utf8,
                    Arc::new(StringArray::from(values.extract::<Vec<Option<String>>>()?)),
                ),
                other => {
                    return Err(pyo3::exceptions::PyValueError::new_err(format!(
                        "column {name}: unknown kind {other}"
                    )));
                }
            };
            fields.push(Field::new(name, dt, true));
            arrays.push(array);
        }
        let schema = Arc::new(Schema::new(fields));
        // No rows gives no keys, hence no columns: an empty table.
        let batch = if arrays.is_empty() {
            RecordBatch::new_empty(schema)
        } else {
            RecordBatch::try_new(schema, arrays)
                .map_err(|e| pyo3::exceptions::PyValueError::new_err(e.to_string()))?
        };
        Ok(ArrowTable { batch })
    }

    /// Rows.
    #[getter]
    fn num_rows(&self) -> usize {
        self.batch.num_rows()
    }

    /// Column names, in order.
    #[getter]
    fn column_names(&self) -> Vec<String> {
        self.batch
            .schema()
            .fields()
            .iter()
            .map(|f| f.name().clone())
            .collect()
    }

    /// The Arrow PyCapsule interface: a stream of this one batch. A
    /// requested schema is not honoured (the types are fixed); consumers
    /// cast if they need to.
    #[pyo3(signature = (requested_schema=None))]
    fn __arrow_c_stream__<'py>(
        &self,
        py: Python<'py>,
        requested_schema: Option<Bound<'py, PyAny>>,
    ) -> PyResult<Bound<'py, PyCapsule>> {
        let _ = requested_schema;
        let schema = self.batch.schema();
        let reader: Box<dyn RecordBatchReader + Send> =
            Box::new(RecordBatchIterator::new([Ok(self.batch.clone())], schema));
        PyCapsule::new_with_value(py, FFI_ArrowArrayStream::new(reader), STREAM)
    }

    fn __repr__(&self) -> String {
        format!(
            "ArrowTable({} rows: {})",
            self.batch.num_rows(),
            self.column_names().join(", ")
        )
    }
}

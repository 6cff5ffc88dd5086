// Chunked reading: the block driver of csv.cpp hands its rows out in chunks
// (csv_detail::read_csv_chunks); this file keeps what the first pass found
// (the schema) and holds later passes to it.
#include "moderato/reading/csv_stream.hpp"

#include <algorithm>
#include <utility>

#include "moderato/support/error.hpp"
#include "reading/csv_internal.hpp"

namespace moderato {

struct CsvStream::State {
    std::string path;
    std::string text;
    bool in_memory = false;
    CsvOptions options;
    detail::CsvTuning tuning;
    std::size_t chunk_rows = 65536;
    Table schema;
    std::size_t rows = 0, passes = 0, largest = 0;
    bool scanned = false;
    csv_detail::FileStamp stamp;
};

namespace {

[[noreturn]] void changed_between_passes(const std::string& name, const std::string& how) {
    throw InputError(name + ": the file changed between the passes of a streamed read (" + how +
                     "); nothing was fitted. Wait until the program writing it has finished, or read a copy, and "
                     "try again");
}

// Adds a first-pass chunk to the schema: kinds and levels so far, the counts
// of text read as missing and their first examples.
void add_to_schema(Table& schema, const Table& chunk) {
    if (schema.columns.empty()) {
        schema.source = chunk.source;
        schema.delimiter = chunk.delimiter;
        schema.columns.resize(chunk.cols());
        for (std::size_t j = 0; j < chunk.cols(); ++j) schema.columns[j].name = chunk.columns[j].name;
    }
    for (std::size_t j = 0; j < chunk.cols(); ++j) {
        const Column& c = chunk.columns[j];
        Column& s = schema.columns[j];
        s.kind = c.kind;
        s.kind_forced = c.kind_forced;
        if (c.kind == ColumnKind::Categorical) {
            if (c.levels.size() > s.levels.size())
                s.levels.insert(s.levels.end(), c.levels.begin() + static_cast<std::ptrdiff_t>(s.levels.size()),
                                c.levels.end());
            s.first_text_line = c.first_text_line;
            s.first_text = c.first_text;
            continue;
        }
        s.text_as_missing += c.text_as_missing;
        for (const TextCell& t : c.text_examples)
            if (s.text_examples.size() < kTextExamples) s.text_examples.push_back(t);
    }
}

// A later pass's chunk against the schema: the same kinds, and levels that
// the first pass found in the same order; the chunk gets all the levels.
void hold_to_schema(const Table& schema, Table& chunk, std::vector<std::size_t>& checked,
                    const std::vector<char>& skipped) {
    if (chunk.cols() != schema.cols()) changed_between_passes(schema.source, "its columns differ");
    checked.resize(schema.cols(), 0);
    for (std::size_t j = 0; j < schema.cols(); ++j) {
        Column& c = chunk.columns[j];
        const Column& s = schema.columns[j];
        if (j < skipped.size() && skipped[j]) continue;
        if (c.kind != s.kind || c.name != s.name)
            changed_between_passes(schema.source, "column '" + s.name + "' no longer reads as it did");
        if (c.kind != ColumnKind::Categorical) continue;
        if (c.levels.size() > s.levels.size())
            changed_between_passes(schema.source, "column '" + s.name + "' has new levels");
        for (std::size_t i = checked[j]; i < c.levels.size(); ++i)
            if (c.levels[i] != s.levels[i])
                changed_between_passes(schema.source, "column '" + s.name + "' has other levels");
        checked[j] = std::max(checked[j], c.levels.size());
        c.levels = s.levels;
    }
}

}  // namespace

CsvStream::CsvStream() : s_(std::make_unique<State>()) {}

CsvStream::CsvStream(std::string path, CsvOptions options, std::size_t chunk_rows) : CsvStream() {
    s_->path = std::move(path);
    s_->options = std::move(options);
    s_->chunk_rows = std::max<std::size_t>(chunk_rows, 1);
    s_->tuning.block_size = std::size_t{4} << 20;  // a few chunks of a typical table per block
}

CsvStream CsvStream::from_text(std::string text, std::string name, CsvOptions options, std::size_t chunk_rows) {
    CsvStream s(std::move(name), std::move(options), chunk_rows);
    s.s_->text = std::move(text);
    s.s_->in_memory = true;
    return s;
}

CsvStream::~CsvStream() = default;
CsvStream::CsvStream(CsvStream&&) noexcept = default;
CsvStream& CsvStream::operator=(CsvStream&&) noexcept = default;

void CsvStream::set_tuning(const detail::CsvTuning& tuning) { s_->tuning = tuning; }

void CsvStream::scan(const CsvChunkFn& fn, const std::function<void()>& restarted) {
    State& st = *s_;
    st.schema = Table{};
    st.rows = 0;
    csv_detail::ChunkSink sink;
    sink.chunk_rows = st.chunk_rows;
    sink.take = [&](Table&& chunk) {
        add_to_schema(st.schema, chunk);
        st.rows += chunk.rows();
        st.largest = std::max(st.largest, chunk.rows());
        fn(chunk);
    };
    sink.restarted = [&] {
        ++st.passes;
        st.schema = Table{};
        st.rows = 0;
        if (restarted) restarted();
    };
    ++st.passes;
    csv_detail::read_csv_chunks(st.path, st.in_memory ? &st.text : nullptr, st.options, {}, st.tuning, sink);
    st.stamp = sink.seen;
    st.scanned = true;
}

void CsvStream::read(const CsvChunkFn& fn, const std::vector<std::string>* keep) {
    State& st = *s_;
    if (!st.scanned) throw InputError(st.path + ": a streamed read must scan the file first");
    csv_detail::ChunkSink sink;
    sink.chunk_rows = st.chunk_rows;
    sink.expect = &st.stamp;
    for (const Column& c : st.schema.columns) {
        sink.text_columns.push_back(c.kind == ColumnKind::Categorical);
        sink.skip_columns.push_back(keep && std::find(keep->begin(), keep->end(), c.name) == keep->end());
    }
    std::vector<std::size_t> checked;
    std::size_t rows = 0;
    sink.take = [&](Table&& chunk) {
        hold_to_schema(st.schema, chunk, checked, sink.skip_columns);
        rows += chunk.rows();
        fn(chunk);
    };
    sink.restarted = [&] { changed_between_passes(st.path, "a column met text it did not have before"); };
    ++st.passes;
    csv_detail::read_csv_chunks(st.path, st.in_memory ? &st.text : nullptr, st.options, {}, st.tuning, sink);
    if (rows != st.rows) changed_between_passes(st.path, "its number of rows differs");
}

const Table& CsvStream::schema() const { return s_->schema; }
const std::string& CsvStream::name() const { return s_->path; }
std::size_t CsvStream::rows() const { return s_->rows; }
std::size_t CsvStream::passes() const { return s_->passes; }
std::size_t CsvStream::chunk_rows() const { return s_->chunk_rows; }
std::size_t CsvStream::largest_chunk() const { return s_->largest; }

}  // namespace moderato

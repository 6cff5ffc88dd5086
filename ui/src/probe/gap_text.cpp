#include "probe/gap_text.hpp"

#include <QCoreApplication>
#include <QStringList>
#include <algorithm>

#include "common/number_text.hpp"

namespace moderato::ui {

namespace {

QString tr(const char* text) { return QCoreApplication::translate("GapText", text); }

struct Piece {
    double a, b;
    bool fromStart, toEnd;  // reaches the lower / upper end of the observed range
};

QString phrase(const Piece& p, const QString& focal) {
    if (p.fromStart && !p.toEnd) return tr("%1 below %2").arg(focal, numberText(p.b));
    if (!p.fromStart && p.toEnd) return tr("%1 above %2").arg(focal, numberText(p.a));
    return tr("%1 from %2").arg(focal, rangeText(p.a, p.b));
}

// "x below 3 and above 7": the focal predictor's name only once.
QString phrases(const std::vector<Piece>& pieces, const QString& focal) {
    QStringList parts;
    for (std::size_t k = 0; k < pieces.size(); ++k) {
        QString s = phrase(pieces[k], focal);
        if (k > 0) s = s.mid(focal.size() + 1);
        parts << s;
    }
    if (parts.size() <= 2) return parts.join(tr(" and "));
    const QString last = parts.takeLast();
    return parts.join(QStringLiteral(", ")) + tr(" and ") + last;
}

}  // namespace

GapStatement describeGap(const SignificanceRegions& regions, const QString& subject, const QString& focal,
                         std::pair<double, double> range, const QString& level) {
    GapStatement out;
    const auto [lo, hi] = range;
    for (double b : regions.boundaries) (b >= lo && b <= hi ? out.inside : out.beyond).push_back(b);

    std::vector<Piece> differ;
    for (const Region& r : regions.significant) {
        const double a = std::max(r.lo, lo), b = std::min(r.hi, hi);
        if (!(b > a)) continue;
        differ.push_back({a, b, r.lo <= lo, r.hi >= hi});
        out.differ.emplace_back(a, b);
    }
    // The rest of the observed range.
    std::vector<Piece> apart;
    double cursor = lo;
    bool atStart = true;
    for (const Piece& p : differ) {
        if (p.a > cursor) apart.push_back({cursor, p.a, atStart, false});
        cursor = p.b;
        atStart = false;
    }
    if (cursor < hi) apart.push_back({cursor, hi, atStart, true});

    const QString observed = rangeText(lo, hi);
    const QString pointwise = tr("%1 pointwise").arg(level);
    if (differ.empty()) {
        out.text = tr("%1 cannot be told apart (%2) anywhere in the observed range of %3 (%4).")
                       .arg(subject, pointwise, focal, observed);
    } else if (apart.empty()) {
        out.text =
            tr("%1 differ (%2) over the whole observed range of %3 (%4).").arg(subject, pointwise, focal, observed);
    } else {
        out.text = tr("%1 differ (%2) for %3").arg(subject, pointwise, phrases(differ, focal));
        if (apart.size() == 1 && !apart.front().fromStart && !apart.front().toEnd && differ.size() == 2)
            out.text += tr("; between these values they cannot be told apart.");
        else out.text += tr("; for %1 they cannot be told apart.").arg(phrases(apart, focal));
    }
    if (!out.beyond.empty()) {
        QStringList where;
        for (double b : out.beyond) where << numberText(b);
        const QString list =
            where.size() == 1 ? where.front()
                              : where.mid(0, where.size() - 1).join(QStringLiteral(", ")) + tr(" and ") + where.back();
        out.text += (out.beyond.size() == 1 ? tr(" The boundary at %1 = %2 lies beyond the data (observed %3).")
                                            : tr(" The boundaries at %1 = %2 lie beyond the data (observed %3)."))
                        .arg(focal, list, observed);
    }
    return out;
}

}  // namespace moderato::ui

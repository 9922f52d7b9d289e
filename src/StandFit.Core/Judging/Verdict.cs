using System.Collections.Immutable;
using StandFit.Core.Problems;

namespace StandFit.Core.Judging;

/// <summary>The decision on a unit.</summary>
public enum Ruling
{
    /// <summary>Inside specification, and the measurement shows it.</summary>
    Pass,

    /// <summary>Outside specification, and the measurement shows it.</summary>
    Fail,

    /// <summary>The measurement cannot decide: test the unit again.</summary>
    Retest,

    /// <summary>The input cannot be judged (a malformed file, no recipe, an impossible fit).</summary>
    Rejected,
}

/// <summary>One reason behind a ruling: a stable code, what it does to the ruling, and a sentence with its numbers.</summary>
public sealed record Finding(string Code, ReasonKind Kind, string Sentence)
{
    /// <summary>For a limit's finding, what the limit decided (value, U, interval, zone, conditional state).</summary>
    public LimitResult? Limit { get; init; }
}

/// <summary>A ruling and its reasons, most severe first (reject, fail, retest, then the checks that passed).</summary>
public sealed record Verdict(Ruling Ruling, ImmutableArray<Finding> Reasons)
{
    public IEnumerable<string> Codes => Reasons.Select(r => r.Code);

    /// <summary>The ruling the findings call for, with the findings ordered by severity (stable within one severity).</summary>
    public static Verdict From(IEnumerable<Finding> findings)
    {
        var ordered = findings.Select((f, i) => (f, i)).OrderBy(x => Severity(x.f.Kind)).ThenBy(x => x.i).Select(x => x.f).ToImmutableArray();
        var ruling = ordered.Length == 0 ? Ruling.Pass : ordered[0].Kind switch
        {
            ReasonKind.Reject => Ruling.Rejected,
            ReasonKind.Fail => Ruling.Fail,
            ReasonKind.Retest => Ruling.Retest,
            _ => Ruling.Pass,
        };
        return new Verdict(ruling, ordered);
    }

    public static Verdict Rejected(Problem problem) =>
        new(Ruling.Rejected, [new Finding(problem.Code, ReasonKind.Reject, $"{problem.Location}: {problem.Message}")]);

    private static int Severity(ReasonKind kind) => kind switch
    {
        ReasonKind.Reject => 0,
        ReasonKind.Fail => 1,
        ReasonKind.Retest => 2,
        _ => 3,
    };
}

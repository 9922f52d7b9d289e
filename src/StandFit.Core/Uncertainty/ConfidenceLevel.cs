using System.Globalization;
using StandFit.Core.Problems;

namespace StandFit.Core.Uncertainty;

/// <summary>
/// A two-sided confidence level as a fraction: 0.95 is 95 %. Valid from 0.5 to 0.999999 inclusive;
/// anything else is a bug at the caller (recipes validate with <see cref="TryCreate"/>).
/// </summary>
public readonly record struct ConfidenceLevel
{
    public const double Min = 0.5;
    public const double Max = 0.999999;

    private ConfidenceLevel(double value) => Value = value;

    public static ConfidenceLevel Default95 { get; } = new(0.95);

    /// <summary>The level as a fraction in [0.5, 0.999999].</summary>
    public double Value { get; }

    /// <summary>The two-sided tail probability 1 - level.</summary>
    public double Alpha => 1.0 - Value;

    public static ConfidenceLevel Of(double value) =>
        IsValid(value) ? new ConfidenceLevel(value) : throw new ArgumentOutOfRangeException(nameof(value), value, "A confidence level is 0.5 to 0.999999.");

    public static bool TryCreate(double value, out ConfidenceLevel level)
    {
        level = IsValid(value) ? new ConfidenceLevel(value) : default;
        return IsValid(value);
    }

    public static bool IsValid(double value) => value is >= Min and <= Max;

    public override string ToString() => Numbers.Format(Value * 100, 6) + " %";

    public string ToFractionString() => Value.ToString("R", CultureInfo.InvariantCulture);
}

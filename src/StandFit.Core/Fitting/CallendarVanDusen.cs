using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// The Callendar-Van Dusen equation of a platinum resistance thermometer above 0 degrees Celsius
/// (IEC 60751): R(t) = R0 (1 + A t + B t^2) for 0 &lt;= t &lt;= 850 C. The stimulus is the
/// reference temperature t in degrees Celsius, the output the resistance. The fit is the quadratic
/// offset + gain t + c2 t^2 (offset = R0, gain = R0 A, c2 = R0 B), and the trade's coefficients are
/// derived from it: R0, A = gain / offset, B = c2 / offset and alpha = (R(100) - R0) / (100 R0) =
/// A + 100 B, with standard errors by the delta method.
/// </summary>
public sealed class CallendarVanDusen : BasisModel
{
    /// <summary>The range of the equation above 0 C, in degrees Celsius (IEC 60751).</summary>
    public const double MinCelsius = 0.0;

    public const double MaxCelsius = 850.0;

    private static readonly ImmutableArray<string> Derived = ["R0", "A", "B", "alpha"];

    private CallendarVanDusen()
        : base([BasisTerm.Constant(1), BasisTerm.Power(1, 0, 1), BasisTerm.Power(1, 0, 2)], 1, ["offset", "gain", "c2"], "callendar-van-dusen")
    {
    }

    public static CallendarVanDusen AboveZero { get; } = new();

    public override ImmutableArray<string> DerivedNames => Derived;

    /// <summary>R(t) = R0 (1 + A t + B t^2).</summary>
    public static double Resistance(double r0, double a, double b, double t) => r0 * (1.0 + (a * t) + (b * t * t));

    public override DomainViolation? CheckDomain(ReadOnlySpan<double> x) =>
        x[0] is >= MinCelsius and <= MaxCelsius ? null : new DomainViolation(0, "Callendar-Van Dusen above 0 C needs 0 <= t <= 850 (degrees Celsius)");

    public override void Derive(ReadOnlySpan<double> parameters, Span<double> values, Span<double> jacobian)
    {
        var (c0, c1, c2) = (parameters[0], parameters[1], parameters[2]);
        jacobian.Clear();
        values[0] = c0;
        jacobian[0] = 1.0;

        values[1] = c1 / c0;
        jacobian[3] = -c1 / (c0 * c0);
        jacobian[4] = 1.0 / c0;

        values[2] = c2 / c0;
        jacobian[6] = -c2 / (c0 * c0);
        jacobian[8] = 1.0 / c0;

        values[3] = (c1 + (100.0 * c2)) / c0;
        jacobian[9] = -(c1 + (100.0 * c2)) / (c0 * c0);
        jacobian[10] = 1.0 / c0;
        jacobian[11] = 100.0 / c0;
    }

    public override string DerivedUnitOf(int derived, ImmutableArray<string> inputUnits, string outputUnit)
    {
        var t = inputUnits.Length > 0 ? inputUnits[0] : "";
        return derived switch
        {
            0 => outputUnit,
            1 or 3 => t.Length == 0 ? "" : "1/" + t,
            _ => t.Length == 0 ? "" : "1/" + t + "^2",
        };
    }
}

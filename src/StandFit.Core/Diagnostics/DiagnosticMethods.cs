namespace StandFit.Core.Diagnostics;

/// <summary>How a diagnostic's p-value was computed, as results and outputs name it.</summary>
public static class DiagnosticMethods
{
    /// <summary>The test cannot be made on this fit (too few points, no replicates, an exact fit ...).</summary>
    public const string NotApplicable = "notapplicable";

    /// <summary>The exact distribution under the test's assumptions (Durbin-Watson by Imhof's integral).</summary>
    public const string Exact = "exact";

    /// <summary>An F distribution (lack of fit, curvature).</summary>
    public const string F = "f";

    /// <summary>The large-sample chi-square distribution (Breusch-Pagan, Ljung-Box).</summary>
    public const string ChiSquare = "chi-square";

    /// <summary>Royston's (1995) normalising approximation of the Shapiro-Wilk W (exact for n = 3).</summary>
    public const string Royston = "royston";

    /// <summary>Stephens' small-sample modified statistic and its fitted p-value curve (Anderson-Darling).</summary>
    public const string Stephens = "stephens";

    /// <summary>Student t with Bonferroni's adjustment for the largest of n statistics (outlier test).</summary>
    public const string Bonferroni = "bonferroni";
}

namespace StandFit.Core.Uncertainty;

/// <summary>
/// One parameter with its Student-t error bar: estimate, standard error, the two-sided interval at the
/// recipe's confidence level, and the t statistic and two-sided p-value for "parameter = 0".
/// </summary>
public sealed record ParameterEstimate(string Name, double Estimate, double StandardError, double Low, double High, double T, double P);

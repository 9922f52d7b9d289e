using System.Globalization;

namespace StandFit.Core.Ingest;

/// <summary>
/// How the cells of a sweep file are written: the character between cells and the decimal
/// separator of numbers. <see cref="Standard"/> (',' between cells, decimal point) is the default;
/// <see cref="DecimalComma"/> (';' between cells, decimal comma) only where a recipe declares
/// <c>decimal_separator: comma</c>. Never a thousands separator.
/// </summary>
public sealed class SweepFormat
{
    private SweepFormat(char cellSeparator, char decimalSeparator, string name)
    {
        CellSeparator = cellSeparator;
        DecimalSeparator = decimalSeparator;
        Name = name;
        var numbers = (NumberFormatInfo)CultureInfo.InvariantCulture.NumberFormat.Clone();
        numbers.NumberDecimalSeparator = decimalSeparator.ToString();
        numbers.NumberGroupSeparator = "\u0001"; // never in a cell (the reader refuses control bytes)
        numbers.CurrencyDecimalSeparator = numbers.NumberDecimalSeparator;
        numbers.CurrencyGroupSeparator = numbers.NumberGroupSeparator;
        Numbers = NumberFormatInfo.ReadOnly(numbers);
    }

    /// <summary>Cells separated by ',', numbers with a decimal point.</summary>
    public static SweepFormat Standard { get; } = new(',', '.', "point");

    /// <summary>Cells separated by ';', numbers with a decimal comma (a European spreadsheet export).</summary>
    public static SweepFormat DecimalComma { get; } = new(';', ',', "comma");

    public char CellSeparator { get; }

    public char DecimalSeparator { get; }

    /// <summary>The recipe's word for it: <c>point</c> or <c>comma</c>.</summary>
    public string Name { get; }

    /// <summary>The number format cells are parsed with (invariant otherwise).</summary>
    public NumberFormatInfo Numbers { get; }

    public override string ToString() => Name;
}

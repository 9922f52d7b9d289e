namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// The model and its gradient at many points in one pass over the program: each instruction is
/// applied to every point before the next (the stack slots hold one value and one gradient per
/// point), so the program is interpreted once per call instead of once per point. The arithmetic
/// of each point is exactly that of <see cref="EvaluateWithGradient"/>, operation by operation and
/// in the same order, so the results are the same bit for bit (tests check every operation).
/// </summary>
public sealed partial class ModelExpression
{
    /// <summary>The scratch length <see cref="EvaluateWithGradientBatch"/> needs for <paramref name="points"/> points.</summary>
    internal int BatchScratchLength(int points) => MaxStack * (ParameterNames.Length + 1) * points;

    /// <summary>
    /// The model's value at the points <paramref name="rows"/> (indices into
    /// <paramref name="variables"/>, which holds one row of <see cref="VariableCount"/> values per
    /// point) into <paramref name="values"/>, and its gradient into <paramref name="jacobian"/>,
    /// column-major: d value[r] / d parameter j at <c>jacobian[j * rows.Length + r]</c>.
    /// <paramref name="scratch"/> holds at least <see cref="BatchScratchLength"/> values.
    /// </summary>
    internal void EvaluateWithGradientBatch(ReadOnlySpan<double> parameters, ReadOnlySpan<double> variables, ReadOnlySpan<int> rows, Span<double> values, Span<double> jacobian, Span<double> scratch)
    {
        var p = ParameterNames.Length;
        var v = VariableNames.Length;
        var m = rows.Length;
        if (parameters.Length != p || values.Length < m || jacobian.Length < p * m || scratch.Length < BatchScratchLength(m))
        {
            throw new ArgumentException("The batch's spans do not match the model and the points.");
        }

        var slot = (p + 1) * m;
        var top = -1;
        foreach (ref readonly var instruction in _program.AsSpan())
        {
            switch (instruction.Operation)
            {
                case Operation.Constant:
                    scratch.Slice(++top * slot, m).Fill(instruction.Constant);
                    continue;
                case Operation.Variable:
                    {
                        var target = scratch.Slice(++top * slot, m);
                        for (var r = 0; r < m; r++)
                        {
                            target[r] = variables[(rows[r] * v) + instruction.Index];
                        }

                        continue;
                    }

                case Operation.Parameter:
                    {
                        var target = scratch.Slice(++top * slot, slot);
                        target.Clear();
                        target[..m].Fill(parameters[instruction.Index]);
                        target.Slice((1 + instruction.Index) * m, m).Fill(1.0);
                        continue;
                    }
            }

            if (IsBinary(instruction.Operation))
            {
                var a = scratch.Slice((top - 1) * slot, slot);
                var b = scratch.Slice(top * slot, slot);
                top--;
                BinaryBatch(instruction.Operation, instruction.Activity, a, b, m, p);
            }
            else
            {
                UnaryBatch(instruction, scratch.Slice(top * slot, slot), m, p);
            }
        }

        scratch[..m].CopyTo(values);
        if (_rootIsActive)
        {
            scratch.Slice(m, p * m).CopyTo(jacobian);
        }
        else
        {
            jacobian[..(p * m)].Clear();
        }
    }

    /// <summary>The scratch length <see cref="EvaluateBatch"/> needs for <paramref name="points"/> points.</summary>
    internal int ValueBatchScratchLength(int points) => MaxStack * points;

    /// <summary>
    /// The model's value alone at the points <paramref name="rows"/> into <paramref name="values"/>:
    /// <see cref="EvaluateWithGradientBatch"/> with no gradient slots. The value of every operation is
    /// computed by the same code in the same order whatever the number of gradient slots, so the
    /// values are bit for bit those of <see cref="EvaluateWithGradientBatch"/> and
    /// <see cref="EvaluateWithGradient"/>. <paramref name="scratch"/> holds at least
    /// <see cref="ValueBatchScratchLength"/> values.
    /// </summary>
    internal void EvaluateBatch(ReadOnlySpan<double> parameters, ReadOnlySpan<double> variables, ReadOnlySpan<int> rows, Span<double> values, Span<double> scratch)
    {
        var v = VariableNames.Length;
        var m = rows.Length;
        if (parameters.Length != ParameterNames.Length || values.Length < m || scratch.Length < ValueBatchScratchLength(m))
        {
            throw new ArgumentException("The batch's spans do not match the model and the points.");
        }

        var top = -1;
        foreach (ref readonly var instruction in _program.AsSpan())
        {
            switch (instruction.Operation)
            {
                case Operation.Constant:
                    scratch.Slice(++top * m, m).Fill(instruction.Constant);
                    continue;
                case Operation.Variable:
                    {
                        var target = scratch.Slice(++top * m, m);
                        for (var r = 0; r < m; r++)
                        {
                            target[r] = variables[(rows[r] * v) + instruction.Index];
                        }

                        continue;
                    }

                case Operation.Parameter:
                    scratch.Slice(++top * m, m).Fill(parameters[instruction.Index]);
                    continue;
            }

            if (IsBinary(instruction.Operation))
            {
                var a = scratch.Slice((top - 1) * m, m);
                var b = scratch.Slice(top * m, m);
                top--;
                BinaryBatch(instruction.Operation, instruction.Activity, a, b, m, 0);
            }
            else
            {
                UnaryBatch(instruction, scratch.Slice(top * m, m), m, 0);
            }
        }

        scratch[..m].CopyTo(values);
    }

    /// <summary><see cref="Binary"/> at every point: a := a op b; slots are [values; gradient 1; ...; gradient p], m each.</summary>
    private static void BinaryBatch(Operation operation, Activity activity, Span<double> a, ReadOnlySpan<double> b, int m, int p)
    {
        var left = (activity & Activity.Left) != 0;
        var right = (activity & Activity.Right) != 0;
        var av = a[..m];
        var bv = b[..m];
        var ga = a.Slice(m, p * m);
        var gb = b.Slice(m, p * m);
        switch (operation)
        {
            case Operation.Add:
                if (right)
                {
                    if (left)
                    {
                        for (var k = 0; k < ga.Length; k++)
                        {
                            ga[k] += 1.0 * gb[k];
                        }
                    }
                    else
                    {
                        gb.CopyTo(ga);
                    }
                }

                for (var r = 0; r < m; r++)
                {
                    av[r] += bv[r];
                }

                break;
            case Operation.Subtract:
                if (right)
                {
                    if (left)
                    {
                        for (var k = 0; k < ga.Length; k++)
                        {
                            ga[k] += -1.0 * gb[k];
                        }
                    }
                    else
                    {
                        for (var k = 0; k < ga.Length; k++)
                        {
                            ga[k] = gb[k] * -1.0;
                        }
                    }
                }

                for (var r = 0; r < m; r++)
                {
                    av[r] -= bv[r];
                }

                break;
            case Operation.Multiply:
                for (var j = 0; j < p; j++)
                {
                    var gaj = ga.Slice(j * m, m);
                    var gbj = gb.Slice(j * m, m);
                    if (left && right)
                    {
                        for (var r = 0; r < m; r++)
                        {
                            gaj[r] = (gaj[r] * bv[r]) + (av[r] * gbj[r]);
                        }
                    }
                    else if (left)
                    {
                        for (var r = 0; r < m; r++)
                        {
                            gaj[r] = gaj[r] * bv[r];
                        }
                    }
                    else if (right)
                    {
                        for (var r = 0; r < m; r++)
                        {
                            gaj[r] = gbj[r] * av[r];
                        }
                    }
                }

                for (var r = 0; r < m; r++)
                {
                    av[r] *= bv[r];
                }

                break;
            case Operation.Divide:
                // The quotient first: the gradient uses it.
                for (var r = 0; r < m; r++)
                {
                    av[r] /= bv[r];
                }

                for (var j = 0; j < p; j++)
                {
                    var gaj = ga.Slice(j * m, m);
                    var gbj = gb.Slice(j * m, m);
                    if (left && right)
                    {
                        for (var r = 0; r < m; r++)
                        {
                            gaj[r] = (gaj[r] - (av[r] * gbj[r])) / bv[r];
                        }
                    }
                    else if (left)
                    {
                        for (var r = 0; r < m; r++)
                        {
                            gaj[r] = gaj[r] * (1.0 / bv[r]);
                        }
                    }
                    else if (right)
                    {
                        for (var r = 0; r < m; r++)
                        {
                            gaj[r] = gbj[r] * (-av[r] / bv[r]);
                        }
                    }
                }

                break;
            default:
                for (var r = 0; r < m; r++)
                {
                    // a^b: d = b a^(b-1) da + a^b ln(a) db; the ln term only where b moves, and zero where a^b is 0.
                    var x = av[r];
                    var y = bv[r];
                    var value = Math.Pow(x, y);
                    var dA = left ? y * Math.Pow(x, y - 1.0) : 0.0;
                    var dB = right ? (value == 0.0 ? 0.0 : value * Math.Log(x)) : 0.0;
                    for (var j = 0; j < p; j++)
                    {
                        var k = (j * m) + r;
                        if (left && right)
                        {
                            ga[k] = (dA * ga[k]) + (dB * gb[k]);
                        }
                        else if (left)
                        {
                            ga[k] = ga[k] * dA;
                        }
                        else if (right)
                        {
                            ga[k] = gb[k] * dB;
                        }
                    }

                    av[r] = value;
                }

                break;
        }
    }

    /// <summary><see cref="Unary"/> at every point: slot := f(slot), the gradient times f'.</summary>
    private static void UnaryBatch(in Instruction instruction, Span<double> slot, int m, int p)
    {
        var active = (instruction.Activity & Activity.Left) != 0;
        var values = slot[..m];
        var gradient = slot.Slice(m, p * m);
        for (var r = 0; r < m; r++)
        {
            var value = UnaryValue(instruction, values[r], out var derivative);
            values[r] = value;
            if (active)
            {
                for (var j = 0; j < p; j++)
                {
                    gradient[(j * m) + r] *= derivative;
                }
            }
        }
    }
}

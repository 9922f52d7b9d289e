using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Edges.RecipeFiles;

/// <summary>The resampling keys: <c>resampling:</c> and the <c>interval</c> of a guarded decision rule.</summary>
public static partial class RecipeBinder
{
    private static IntervalSource? ReadInterval(MapReader section, DecisionRule? rule)
    {
        var text = section.Text("interval", required: false);
        if (text is null)
        {
            return null;
        }

        var index = RecipeSchema.IntervalNames.IndexOf(text);
        if (index < 0)
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(section.Path("interval"), text, RecipeSchema.IntervalNames, Suggestions.Closest(text, RecipeSchema.IntervalNames)), section.Node("interval"));
            return null;
        }

        var interval = (IntervalSource)index;
        if (rule == DecisionRule.Simple)
        {
            section.Sink.Add(RecipeCodes.Contradiction, Messages.IntervalWithoutGuarded(section.Where), section.Node("interval"));
            return null;
        }

        if (interval != IntervalSource.T && section.Has("coverage_factor"))
        {
            section.Sink.Add(RecipeCodes.Contradiction, Messages.IntervalWithCoverage(section.Where, text), section.Node("interval"));
            return null;
        }

        return interval;
    }

    private static ResamplingPlan? ReadResampling(MapReader top, ColumnMap? columns, ImmutableArray<FigureLimit> limits)
    {
        var spec = Root.Child("resampling");
        var section = top.Map("resampling", spec.ChildNames, required: false);
        var usesJackknife = limits.Any(l => l.Interval == IntervalSource.Jackknife);
        var bootstrapLimit = limits.FirstOrDefault(l => IntervalSources.IsBootstrap(l.Interval));
        foreach (var limit in limits.Where(l => l.Interval != IntervalSource.T && l.Guard is not null))
        {
            top.Sink.Add(RecipeCodes.Contradiction, Messages.IntervalWithCoverage("limits." + limit.Figure, IntervalSources.Name(limit.Interval)), top.KeyNode("limits"));
        }

        if (section is null)
        {
            if (usesJackknife || bootstrapLimit is not null)
            {
                var figure = (bootstrapLimit ?? limits.First(l => l.Interval == IntervalSource.Jackknife)).Figure;
                top.Sink.Add(RecipeCodes.MissingKey, Messages.ResamplingNeeded(figure), top.KeyNode("limits"));
            }

            return null;
        }

        var seed = section.Integer("seed", required: true);
        if (seed is < 0)
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(section.Path("seed"), seed.Value.ToString(CultureInfo.InvariantCulture), "a whole number from 0 to 2147483647"), section.Node("seed"));
            seed = null;
        }

        BootstrapScheme? scheme = null;
        if (section.Text("bootstrap", required: false) is { } schemeText)
        {
            var index = RecipeSchema.BootstrapSchemes.IndexOf(schemeText);
            if (index < 0)
            {
                section.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(section.Path("bootstrap"), schemeText, RecipeSchema.BootstrapSchemes, Suggestions.Closest(schemeText, RecipeSchema.BootstrapSchemes)), section.Node("bootstrap"));
            }
            else
            {
                scheme = (BootstrapScheme)index;
            }
        }

        var resamples = section.Integer("resamples", required: false);
        var resamplesSpec = spec.Child("resamples");
        if (resamples is { } b && (b < resamplesSpec.Minimum || b > resamplesSpec.Maximum))
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(section.Path("resamples"), b.ToString(CultureInfo.InvariantCulture), "a whole number from 100 to 100000 (1000 or more for percentile and BCa intervals)"), section.Node("resamples"));
            resamples = null;
        }

        var jackknife = JackknifeGroups.DeleteOne;
        if (section.Text("jackknife", required: false) is { } jackText)
        {
            var index = RecipeSchema.JackknifeKinds.IndexOf(jackText);
            if (index < 0)
            {
                section.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(section.Path("jackknife"), jackText, RecipeSchema.JackknifeKinds, Suggestions.Closest(jackText, RecipeSchema.JackknifeKinds)), section.Node("jackknife"));
            }
            else
            {
                jackknife = (JackknifeGroups)index;
                if (jackknife != JackknifeGroups.DeleteOne && columns is not null && columns.Leg is null)
                {
                    section.Sink.Add(RecipeCodes.Contradiction, Messages.NeedsLegColumn(section.Path("jackknife")), section.Node("jackknife"));
                }
            }
        }

        var maxFailed = section.Number("max_failed_percent", required: false);
        if (maxFailed is { } m && !(m is >= 0 and <= 100))
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(section.Path("max_failed_percent"), Numbers.Format(m), "a percentage from 0 to 100 (5 is common)"), section.Node("max_failed_percent"));
            maxFailed = null;
        }

        if (bootstrapLimit is not null)
        {
            // A default that would change a ruling is never taken silently.
            var interval = IntervalSources.Name(bootstrapLimit.Interval);
            if (scheme is null && !section.Has("bootstrap"))
            {
                section.Sink.Add(RecipeCodes.MissingKey, Messages.BootstrapKeyNeeded("bootstrap", bootstrapLimit.Figure, interval), section.Mapping);
            }

            if (!section.Has("resamples"))
            {
                section.Sink.Add(RecipeCodes.MissingKey, Messages.BootstrapKeyNeeded("resamples", bootstrapLimit.Figure, interval), section.Mapping);
            }

            if (!section.Has("max_failed_percent"))
            {
                section.Sink.Add(RecipeCodes.MissingKey, Messages.BootstrapKeyNeeded("max_failed_percent", bootstrapLimit.Figure, interval), section.Mapping);
            }
        }

        return seed is null ? null : new ResamplingPlan((ulong)seed.Value)
        {
            Bootstrap = scheme,
            Resamples = resamples ?? ResamplingPlan.DefaultResamples,
            ResamplesStated = resamples is not null,
            Jackknife = jackknife,
            MaxFailedPercent = maxFailed,
        };
    }
}

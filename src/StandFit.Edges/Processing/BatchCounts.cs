using StandFit.Core.Judging;

namespace StandFit.Edges.Processing;

/// <summary>Counts of rulings, added up as units are published.</summary>
public sealed class BatchCounts
{
    public int Processed { get; private set; }

    public int Passed { get; private set; }

    public int Failed { get; private set; }

    public int Retest { get; private set; }

    public int Rejected { get; private set; }

    /// <summary>Inputs that could not be read at all (vanished, locked) and were left for a later try. Inputs not started because of a stop are not counted.</summary>
    public int Skipped { get; private set; }

    public void Add(Ruling ruling)
    {
        Processed++;
        switch (ruling)
        {
            case Ruling.Pass: Passed++; break;
            case Ruling.Fail: Failed++; break;
            case Ruling.Retest: Retest++; break;
            default: Rejected++; break;
        }
    }

    /// <summary>Inputs whose unit key was already published: recorded as duplicates, not judged again.</summary>
    public int Duplicates { get; private set; }

    /// <summary>Inputs held for the first time because no recipe lists their part (<c>watch</c>): not judged, not counted in <see cref="Processed"/>.</summary>
    public int HeldForRecipe { get; private set; }

    public void AddSkipped() => Skipped++;

    public void AddHeldForRecipe() => HeldForRecipe++;

    public void AddDuplicate() => Duplicates++;

    public void Add(BatchCounts other)
    {
        Processed += other.Processed;
        Passed += other.Passed;
        Failed += other.Failed;
        Retest += other.Retest;
        Rejected += other.Rejected;
        Skipped += other.Skipped;
        Duplicates += other.Duplicates;
        HeldForRecipe += other.HeldForRecipe;
    }
}

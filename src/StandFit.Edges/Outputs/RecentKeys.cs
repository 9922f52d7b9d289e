namespace StandFit.Edges.Outputs;

/// <summary>
/// The keys of the batches a journal file holds now (those after its header): the part of a
/// worker's index not yet folded into index files, kept in memory. Bounded, because the journal is
/// compacted once it holds <c>output.journal_compact_units</c> units. A key keeps its first result
/// (the first one added wins); a part and serial keeps its latest key (the last one added wins,
/// which is the journal's order). Duplicates add nothing: they were never published.
/// </summary>
internal sealed class RecentKeys
{
    private Dictionary<UnitKeyBits, (long AtTicks, byte Ruling)> _keys = [];
    private Dictionary<UInt128, (UnitKeyBits Key, long AtTicks)> _serials = [];

    public int Count => _keys.Count;

    /// <summary>Key and serial records together: the size the merge policy weighs.</summary>
    public int Records => _keys.Count + _serials.Count;

    public void Add(JournalUnit unit, DateTime at)
    {
        if (unit.Outcome == JournalOutcomes.Duplicate || !UnitKeyBits.TryParse(unit.Key, out var key))
        {
            return;
        }

        _keys.TryAdd(key, (at.Ticks, KeyRecord.RulingCode(unit.Ruling)));
        if (unit.Serial is not null)
        {
            _serials[SerialBits.Of(unit.Part, unit.Serial)] = (key, at.Ticks);
        }
    }

    public bool TryFind(UnitKeyBits key, out KeyRecord record)
    {
        var found = _keys.TryGetValue(key, out var first);
        record = new KeyRecord(key, first.AtTicks, first.Ruling);
        return found;
    }

    public bool TryFind(UInt128 serial, out SerialRecord record)
    {
        var found = _serials.TryGetValue(serial, out var latest);
        record = new SerialRecord(serial, latest.Key, latest.AtTicks);
        return found;
    }

    public KeyRecord[] SortedKeys()
    {
        var records = _keys.Select(k => new KeyRecord(k.Key, k.Value.AtTicks, k.Value.Ruling)).ToArray();
        Array.Sort(records, KeyRecord.CompareKeys);
        return records;
    }

    public SerialRecord[] SortedSerials()
    {
        var records = _serials.Select(s => new SerialRecord(s.Key, s.Value.Key, s.Value.AtTicks)).ToArray();
        Array.Sort(records, SerialRecord.CompareKeys);
        return records;
    }

    /// <summary>Forgets everything (the keys are in an index file now); the memory goes with the old tables.</summary>
    public void Clear()
    {
        _keys = [];
        _serials = [];
    }
}

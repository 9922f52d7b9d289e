using StandFit.Edges.Folders;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>The stability window for producers that write in place: size and time must hold still on the monotonic clock.</summary>
public sealed class InboxScannerTests
{
    [Fact]
    public void A_file_is_taken_only_after_its_size_and_time_held_still_for_the_window()
    {
        using var root = new TempFolder();
        var inbox = root.Sub("inbox");
        var clock = new ManualClock(DateTimeOffset.UnixEpoch);
        var scanner = new InboxScanner(inbox, TimeSpan.FromSeconds(2), clock);
        var path = Path.Combine(inbox, "unit.csv");
        File.WriteAllText(path, "# serial: A\n");

        Assert.Empty(scanner.Scan()); // first seen
        clock.Advance(TimeSpan.FromSeconds(1.5));
        Assert.Empty(scanner.Scan()); // not yet 2 s

        File.AppendAllText(path, "x,y\n1,2\n"); // the producer is still writing: the window starts again
        clock.Advance(TimeSpan.FromSeconds(1));
        Assert.Empty(scanner.Scan());
        clock.Advance(TimeSpan.FromSeconds(1.5));
        Assert.Empty(scanner.Scan());
        clock.Advance(TimeSpan.FromSeconds(0.6));
        Assert.Equal([path], scanner.Scan());
    }

    [Fact]
    public void A_wall_clock_jump_neither_shortens_nor_lengthens_the_window()
    {
        using var root = new TempFolder();
        var inbox = root.Sub("inbox");
        var clock = new ManualClock(DateTimeOffset.UnixEpoch.AddYears(50));
        var scanner = new InboxScanner(inbox, TimeSpan.FromSeconds(2), clock);
        var path = Path.Combine(inbox, "unit.csv");
        File.WriteAllText(path, "x,y\n1,2\n");

        Assert.Empty(scanner.Scan());
        clock.SetWallClock(DateTimeOffset.UnixEpoch.AddYears(60)); // ten years ahead
        Assert.Empty(scanner.Scan());
        clock.SetWallClock(DateTimeOffset.UnixEpoch); // and far back
        clock.Advance(TimeSpan.FromSeconds(2));
        Assert.Equal([path], scanner.Scan());
    }

    [Fact]
    public void With_a_zero_window_every_ready_file_is_taken_at_once_and_temporary_names_never()
    {
        using var root = new TempFolder();
        var inbox = root.Sub("inbox");
        var scanner = new InboxScanner(inbox, TimeSpan.Zero, new ManualClock(DateTimeOffset.UnixEpoch));
        File.WriteAllText(Path.Combine(inbox, "a.csv"), "x");
        File.WriteAllText(Path.Combine(inbox, "b.csv.tmp"), "x");
        File.WriteAllText(Path.Combine(inbox, ".c.csv"), "x");

        Assert.Equal([Path.Combine(inbox, "a.csv")], scanner.Scan());
    }
}

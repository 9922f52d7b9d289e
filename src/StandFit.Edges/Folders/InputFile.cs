namespace StandFit.Edges.Folders;

/// <summary>
/// One input in hand: where its bytes are now (<see cref="Path"/>: the claimed copy, or the file
/// read in place), the name it was dropped under (<see cref="Name"/>, used in rows, lines and
/// archive names), and its claim name inside the worker's claim folder (null when read in place).
/// </summary>
public sealed record InputFile(string Path, string Name, string? Claim);

/// <summary>Where a batch's inputs come from: claimed out of the inbox, or read in place.</summary>
public interface IInputIntake
{
    DispositionMode Mode { get; }

    /// <summary>Inputs claimed earlier and not yet moved on (after a crash, a stop or an output fault).</summary>
    IReadOnlyList<InputFile> Leftovers();

    /// <summary>Takes the given ready files; a file another worker took first is left out.</summary>
    IReadOnlyList<InputFile> Take(IReadOnlyList<string> paths);

    /// <summary>Gives back an input that was taken but not judged (a stop): it is ready again.</summary>
    void Release(InputFile input);
}

/// <summary>A folder read in place (<c>run --from</c>): nothing is claimed, nothing is left over.</summary>
public sealed class InPlaceIntake : IInputIntake
{
    public DispositionMode Mode => DispositionMode.Copy;

    public IReadOnlyList<InputFile> Leftovers() => [];

    public IReadOnlyList<InputFile> Take(IReadOnlyList<string> paths) => [.. paths.Select(p => new InputFile(p, System.IO.Path.GetFileName(p), null))];

    public void Release(InputFile input)
    {
        // Nothing was taken: the file never left its folder.
    }
}

using StandFit.Core.Problems;

namespace StandFit.Edges.RecipeFiles;

/// <summary>Collects every problem of one file, so that all of them are reported at once.</summary>
public sealed class ProblemSink(string file)
{
    private readonly List<Problem> _problems = [];

    public string File { get; } = file;

    public IReadOnlyList<Problem> Problems => _problems;

    public bool HasProblems => _problems.Count > 0;

    public void Add(string code, string message, YamlNode? at) =>
        _problems.Add(new Problem(code, message, at is null ? SourceLocation.WholeFile(File) : SourceLocation.At(at.File ?? File, at.Line, at.Column)));

    public void Add(Problem problem) => _problems.Add(problem);
}

namespace ShuntSweep.Core.Documents;

/// <summary>Bad input in a ShuntSweep file: says which file, where, and what was expected.</summary>
/// <remarks>Line and column are 1-based; 0 means the position is not known (an empty file, say).</remarks>
public sealed class DocumentException : Exception
{
    /// <summary>Creates an error at a position of a file.</summary>
    public DocumentException(string file, int line, int column, string problem)
        : base(line > 0 ? $"{file}:{line}:{column}: {problem}" : $"{file}: {problem}")
    {
        File = file;
        Line = line;
        Column = column;
        Problem = problem;
    }

    /// <summary>The path of the file as the user gave it.</summary>
    public string File { get; }

    /// <summary>The 1-based line of the problem.</summary>
    public int Line { get; }

    /// <summary>The 1-based column of the problem.</summary>
    public int Column { get; }

    /// <summary>What is wrong and what was expected, without the position.</summary>
    public string Problem { get; }
}

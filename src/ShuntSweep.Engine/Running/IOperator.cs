using ShuntSweep.Engine.Planning;

namespace ShuntSweep.Engine.Running;

/// <summary>The person (or stand-in) who does what the bench cannot: re-wiring, turning a range switch.</summary>
public interface IOperator
{
    /// <summary>Shows the prompt and returns true when the operator has done it, false to abort the run.</summary>
    Task<bool> ConfirmAsync(PromptStep prompt, CancellationToken cancellationToken);

    /// <summary>Who answers <paramref name="prompt"/>, for the journal (the operator at the terminal, an answers file, --yes).</summary>
    string Describe(PromptStep prompt);
}

/// <summary>Answers prompts from an answers file for unattended runs; a prompt the file does not answer aborts the run.</summary>
public sealed class AnswerFileOperator(IReadOnlyDictionary<string, bool> answers, bool? otherwise) : IOperator
{
    /// <summary>Loads an answers file: a mapping of prompt ids to <c>done</c> or <c>abort</c>, with an optional <c>otherwise</c>.</summary>
    public static AnswerFileOperator Load(string path)
    {
        var doc = Core.Documents.YamlDocument.Load(path);
        var answers = new Dictionary<string, bool>(StringComparer.Ordinal);
        bool? otherwise = null;
        foreach (var (key, value) in doc.Entries())
        {
            var answer = value.AsString() switch
            {
                "done" => true,
                "abort" => false,
                var other => throw value.Error($"{key}: expected 'done' or 'abort', found '{other}'."),
            };
            if (key == "otherwise")
            {
                otherwise = answer;
            }
            else
            {
                answers[key] = answer;
            }
        }

        return new AnswerFileOperator(answers, otherwise);
    }

    /// <inheritdoc />
    public Task<bool> ConfirmAsync(PromptStep prompt, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(prompt);
        return Task.FromResult(answers.TryGetValue(prompt.Id, out var a) ? a : otherwise ?? false);
    }

    /// <inheritdoc />
    public string Describe(PromptStep prompt) => "answers file";
}

/// <summary>The operator of a simulated bench: the simulated UUT follows the plan's wiring, so every prompt is done at once.</summary>
public sealed class SimulatedOperator : IOperator
{
    /// <inheritdoc />
    public Task<bool> ConfirmAsync(PromptStep prompt, CancellationToken cancellationToken) => Task.FromResult(true);

    /// <inheritdoc />
    public string Describe(PromptStep prompt) => "simulated operator";
}

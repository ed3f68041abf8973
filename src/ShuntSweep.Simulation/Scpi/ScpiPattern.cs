namespace ShuntSweep.Simulation.Scpi;

/// <summary>A command pattern in SCPI-99 notation, such as <c>[SOURce:]VOLTage[:LEVel]?</c> or <c>OUTPut#[:STATe]</c>, and its matching.</summary>
/// <remarks>Upper-case letters of a keyword form its short form; a header mnemonic matches when it is the short or the long form,
/// case-insensitively, and nothing in between (SCPI-99 vol. 1 §6.2.1). Keywords in brackets may be omitted (§6.2.5).
/// A trailing <c>#</c> accepts a numeric suffix (§6.2.5.2), 1 when absent.</remarks>
internal sealed class ScpiPattern
{
    private readonly Keyword[] _keywords;

    private ScpiPattern(string text, Keyword[] keywords, bool isQuery)
    {
        Text = text;
        _keywords = keywords;
        IsQuery = isQuery;
    }

    /// <summary>The pattern as written.</summary>
    public string Text { get; }

    /// <summary>True for a query pattern.</summary>
    public bool IsQuery { get; }

    /// <summary>Parses pattern text.</summary>
    public static ScpiPattern Parse(string text)
    {
        var isQuery = text.EndsWith('?');
        var body = isQuery ? text[..^1] : text;
        var keywords = new List<Keyword>();
        var i = 0;
        while (i < body.Length)
        {
            var optional = false;
            if (body[i] == '[')
            {
                optional = true;
                i++;
            }

            if (i < body.Length && body[i] == ':')
            {
                i++;
            }

            var begin = i;
            while (i < body.Length && body[i] is not (':' or '[' or ']'))
            {
                i++;
            }

            var word = body[begin..i];
            if (optional)
            {
                if (i < body.Length && body[i] == ':')
                {
                    i++;
                }

                if (i >= body.Length || body[i] != ']')
                {
                    throw new ArgumentException($"Unbalanced brackets in pattern '{text}'.", nameof(text));
                }

                i++;
            }

            keywords.Add(Keyword.Of(word, optional));
        }

        return new ScpiPattern(text, [.. keywords], isQuery);
    }

    /// <summary>Tries to match <paramref name="mnemonics"/>; on success <paramref name="suffixes"/> holds one numeric suffix per keyword.</summary>
    public bool TryMatch(IReadOnlyList<string> mnemonics, out int[] suffixes)
    {
        suffixes = new int[_keywords.Length];
        return Match(0, 0, mnemonics, suffixes);
    }

    private bool Match(int k, int m, IReadOnlyList<string> mnemonics, int[] suffixes)
    {
        if (k == _keywords.Length)
        {
            return m == mnemonics.Count;
        }

        var keyword = _keywords[k];
        if (m < mnemonics.Count && keyword.Matches(mnemonics[m], out var suffix))
        {
            suffixes[k] = suffix;
            if (Match(k + 1, m + 1, mnemonics, suffixes))
            {
                return true;
            }
        }

        if (keyword.Optional)
        {
            suffixes[k] = 1;
            return Match(k + 1, m, mnemonics, suffixes);
        }

        return false;
    }

    private sealed record Keyword(string Short, string Long, bool Optional, bool TakesSuffix)
    {
        public static Keyword Of(string word, bool optional)
        {
            var takesSuffix = word.EndsWith('#');
            var bare = takesSuffix ? word[..^1] : word;
            var cut = 0;
            while (cut < bare.Length && !char.IsLower(bare[cut]))
            {
                cut++;
            }

            return new Keyword(bare[..cut].ToUpperInvariant(), bare.ToUpperInvariant(), optional, takesSuffix);
        }

        public bool Matches(string mnemonic, out int suffix)
        {
            suffix = 1;
            var name = mnemonic;
            if (TakesSuffix)
            {
                var end = name.Length;
                while (end > 0 && char.IsAsciiDigit(name[end - 1]))
                {
                    end--;
                }

                if (end < name.Length)
                {
                    if (!int.TryParse(name.AsSpan(end), out suffix) || suffix < 1)
                    {
                        return false;
                    }

                    name = name[..end];
                }
            }

            return name == Short || name == Long;
        }
    }
}

using System.Text;

namespace ShuntSweep.Simulation.Scpi;

/// <summary>One program message unit: a header (common or compound), whether it is a query, and its raw parameters.</summary>
/// <param name="IsCommon">True for an IEEE 488.2 common command such as <c>*IDN?</c>.</param>
/// <param name="IsAbsolute">True when the compound header starts with a colon (it does not continue the previous unit's path).</param>
/// <param name="Mnemonics">The header's mnemonics, upper-cased (for a common command, the mnemonic after the star).</param>
/// <param name="IsQuery">True when the header ends with a question mark.</param>
/// <param name="Parameters">The parameters as written, separated by commas outside strings.</param>
internal sealed record ScpiMessageUnit(bool IsCommon, bool IsAbsolute, IReadOnlyList<string> Mnemonics, bool IsQuery, IReadOnlyList<ScpiParameter> Parameters);

/// <summary>A parameter as written: its text, and whether it was a quoted string (then <see cref="Text"/> is the unquoted content).</summary>
internal sealed record ScpiParameter(string Text, bool IsString);

/// <summary>Splits a program message (one line) into units per IEEE 488.2 §7 and SCPI-99 §6: <c>;</c> separates units, <c>:</c> separates mnemonics, white space separates header from parameters, <c>,</c> separates parameters.</summary>
/// <remarks>The section numbers of IEEE 488.2-1992 and SCPI-99 cited in this folder are from memory (the standards' texts are not in our
/// reference data); the rules themselves are corroborated by the open j123b567/scpi-parser sources and tests.</remarks>
internal static class ScpiParser
{
    /// <summary>The longest program mnemonic IEEE 488.2 §7.6.1.2 allows (12 characters).</summary>
    public const int MaxMnemonicLength = 12;

    /// <summary>Splits <paramref name="line"/> at the semicolons that are outside quoted strings.</summary>
    public static IReadOnlyList<string> SplitUnits(string line)
    {
        var units = new List<string>();
        var start = 0;
        char quote = '\0';
        for (var i = 0; i < line.Length; i++)
        {
            var c = line[i];
            if (quote != '\0')
            {
                if (c == quote)
                {
                    quote = '\0';
                }
            }
            else if (c is '"' or '\'')
            {
                quote = c;
            }
            else if (c == ';')
            {
                units.Add(line[start..i]);
                start = i + 1;
            }
        }

        units.Add(line[start..]);
        return units;
    }

    /// <summary>Parses one unit's text; throws <see cref="ScpiException"/> with the matching SCPI-99 code on bad syntax.</summary>
    public static ScpiMessageUnit ParseUnit(string text)
    {
        foreach (var c in text)
        {
            if (c > 0x7E || (c < 0x20 && c != '\t'))
            {
                throw new ScpiException(ScpiErrors.InvalidCharacter, $"byte 0x{(int)c:X2}");
            }
        }

        var s = text.Trim(' ', '\t');
        var i = 0;
        var isCommon = false;
        var isAbsolute = false;
        if (i < s.Length && s[i] == '*')
        {
            isCommon = true;
            i++;
        }
        else if (i < s.Length && s[i] == ':')
        {
            isAbsolute = true;
            i++;
        }

        var mnemonics = new List<string>();
        while (true)
        {
            var begin = i;
            if (i >= s.Length || !char.IsAsciiLetter(s[i]))
            {
                throw new ScpiException(ScpiErrors.SyntaxError, "a header mnemonic must start with a letter");
            }

            while (i < s.Length && (char.IsAsciiLetterOrDigit(s[i]) || s[i] == '_'))
            {
                i++;
            }

            var mnemonic = s[begin..i];
            var withoutSuffix = mnemonic.TrimEnd("0123456789".ToCharArray());
            if (withoutSuffix.Length > MaxMnemonicLength)
            {
                throw new ScpiException(ScpiErrors.ProgramMnemonicTooLong);
            }

            mnemonics.Add(mnemonic.ToUpperInvariant());
            if (i < s.Length && s[i] == ':' && !isCommon)
            {
                i++;
                continue;
            }

            break;
        }

        var isQuery = false;
        if (i < s.Length && s[i] == '?')
        {
            isQuery = true;
            i++;
        }

        if (i < s.Length && s[i] is not (' ' or '\t'))
        {
            throw new ScpiException(
                s[i] == ':' || s[i] == '?' ? ScpiErrors.SyntaxError : ScpiErrors.InvalidSeparator,
                $"unexpected '{s[i]}' in the header");
        }

        var rest = s[i..].Trim(' ', '\t');
        return new ScpiMessageUnit(isCommon, isAbsolute, mnemonics, isQuery, SplitParameters(rest));
    }

    private static List<ScpiParameter> SplitParameters(string rest)
    {
        var result = new List<ScpiParameter>();
        if (rest.Length == 0)
        {
            return result;
        }

        var i = 0;
        while (true)
        {
            while (i < rest.Length && rest[i] is ' ' or '\t')
            {
                i++;
            }

            if (i >= rest.Length)
            {
                throw new ScpiException(ScpiErrors.SyntaxError, "a parameter is missing after a comma");
            }

            if (rest[i] is '"' or '\'')
            {
                var quote = rest[i];
                var text = new StringBuilder();
                i++;
                while (true)
                {
                    if (i >= rest.Length)
                    {
                        throw new ScpiException(ScpiErrors.InvalidStringData, "the string is not closed");
                    }

                    if (rest[i] == quote)
                    {
                        // A doubled quote inside a string stands for one quote (IEEE 488.2 §7.7.5.2).
                        if (i + 1 < rest.Length && rest[i + 1] == quote)
                        {
                            text.Append(quote);
                            i += 2;
                            continue;
                        }

                        i++;
                        break;
                    }

                    text.Append(rest[i]);
                    i++;
                }

                result.Add(new ScpiParameter(text.ToString(), true));
                while (i < rest.Length && rest[i] is ' ' or '\t')
                {
                    i++;
                }
            }
            else if (rest[i] == '#' && i + 1 < rest.Length && char.IsAsciiDigit(rest[i + 1]))
            {
                throw new ScpiException(ScpiErrors.BlockDataNotAllowed);
            }
            else
            {
                var begin = i;
                while (i < rest.Length && rest[i] != ',')
                {
                    if (rest[i] is '"' or '\'')
                    {
                        throw new ScpiException(ScpiErrors.SyntaxError, "a quote inside a parameter");
                    }

                    i++;
                }

                var text = rest[begin..i].Trim(' ', '\t');
                if (text.Length == 0)
                {
                    throw new ScpiException(ScpiErrors.SyntaxError, "an empty parameter");
                }

                result.Add(new ScpiParameter(text, false));
            }

            if (i >= rest.Length)
            {
                return result;
            }

            if (rest[i] != ',')
            {
                throw new ScpiException(ScpiErrors.InvalidSeparator, "expected a comma between parameters");
            }

            i++;
        }
    }
}

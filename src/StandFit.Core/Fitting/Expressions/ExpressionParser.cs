using StandFit.Core.Problems;

namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// Parses a model expression (docs/expressions.md) by recursive descent and compiles it into a
/// <see cref="ModelExpression"/>. The grammar, loosest binding first:
/// <code>
/// expression := term (('+' | '-') term)*
/// term       := unary (('*' | '/') unary)*
/// unary      := ('-' | '+') unary | power
/// power      := primary (('^' | '**') unary)?        right-associative: 2^3^2 = 2^9
/// primary    := number | name | function '(' expression ')' | '(' expression ')'
/// </code>
/// Square brackets group like parentheses (<c>exp[-b2*x]</c>, as NIST writes its models) and must
/// close with their own kind. A name is a variable when it is in the variable list, the constant
/// <c>pi</c>, and otherwise a parameter. There is no implicit multiplication: <c>2x</c> is an error.
/// </summary>
public static class ExpressionParser
{
    /// <summary>
    /// Parses <paramref name="text"/> over the stimulus <paramref name="variables"/> (their order is
    /// the order of the values later passed to <see cref="ModelExpression.Evaluate"/>). With
    /// <paramref name="parameters"/> given, every other name must be one of them and each must be
    /// used, and the parameter vector has their order; without it, every other name is a parameter,
    /// in the order of first appearance. Never throws for bad text: the problem comes back as an
    /// <see cref="ExpressionError"/> with its column.
    /// </summary>
    public static ExpressionParseResult Parse(string text, IReadOnlyList<string> variables, IReadOnlyList<string>? parameters = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        ArgumentNullException.ThrowIfNull(variables);
        var names = CheckNames(variables, parameters);
        if (names is not null)
        {
            return ExpressionParseResult.Failure(names);
        }

        if (text.Length > ExpressionLanguage.MaxLength)
        {
            return ExpressionParseResult.Failure(new ExpressionError(Messages.ExpressionTooLong(text.Length, ExpressionLanguage.MaxLength), ExpressionLanguage.MaxLength + 1));
        }

        if (string.IsNullOrWhiteSpace(text))
        {
            return ExpressionParseResult.Failure(new ExpressionError(Messages.ExpressionEmpty(), 0));
        }

        var tokens = new List<Token>();
        var tokenError = ExpressionTokenizer.Tokenize(text, tokens);
        if (tokenError is not null)
        {
            return ExpressionParseResult.Failure(tokenError);
        }

        var parser = new Parser(text, tokens, variables, parameters);
        var root = parser.ParseWhole();
        if (root is null)
        {
            return ExpressionParseResult.Failure(parser.Error!);
        }

        var parameterNames = parser.ParameterNames;
        if (parameterNames.Count == 0)
        {
            return ExpressionParseResult.Failure(new ExpressionError(Messages.ExpressionNoParameters(), 0));
        }

        if (parameters is not null)
        {
            foreach (var name in parameters)
            {
                if (!parser.Used.Contains(name))
                {
                    return ExpressionParseResult.Failure(new ExpressionError(Messages.ExpressionUnusedParameter(name), 0));
                }
            }
        }

        return ExpressionCompiler.Compile(text, root, [.. variables], [.. parameterNames]);
    }

    private static ExpressionError? CheckNames(IReadOnlyList<string> variables, IReadOnlyList<string>? parameters)
    {
        if (variables.Count > ExpressionLanguage.MaxVariables)
        {
            return new ExpressionError(Messages.ExpressionTooManyVariables(variables.Count, ExpressionLanguage.MaxVariables), 0);
        }

        if (parameters is not null && parameters.Count > ExpressionLanguage.MaxParameters)
        {
            return new ExpressionError(Messages.ExpressionTooManyParameters(parameters.Count, ExpressionLanguage.MaxParameters), 0);
        }

        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var (name, role) in variables.Select(v => (v, "variable")).Concat((parameters ?? []).Select(p => (p, "parameter"))))
        {
            if (!ExpressionLanguage.IsValidName(name ?? string.Empty))
            {
                return new ExpressionError(Messages.ExpressionBadName(name ?? string.Empty, role, ExpressionLanguage.IsReserved(name ?? string.Empty)), 0);
            }

            if (!seen.Add(name!))
            {
                return new ExpressionError(Messages.ExpressionDuplicateName(name!), 0);
            }
        }

        return null;
    }

    private sealed class Parser
    {
        private readonly string _text;
        private readonly List<Token> _tokens;
        private readonly Dictionary<string, int> _variables = new(StringComparer.Ordinal);
        private readonly Dictionary<string, int> _parameters = new(StringComparer.Ordinal);
        private readonly bool _parametersGiven;
        private int _position;
        private int _depth;

        public Parser(string text, List<Token> tokens, IReadOnlyList<string> variables, IReadOnlyList<string>? parameters)
        {
            _text = text;
            _tokens = tokens;
            for (var i = 0; i < variables.Count; i++)
            {
                _variables[variables[i]] = i;
            }

            _parametersGiven = parameters is not null;
            if (parameters is not null)
            {
                foreach (var name in parameters)
                {
                    _parameters[name] = ParameterNames.Count;
                    ParameterNames.Add(name);
                }
            }
        }

        public ExpressionError? Error { get; private set; }

        public List<string> ParameterNames { get; } = [];

        public HashSet<string> Used { get; } = new(StringComparer.Ordinal);

        private Token Current => _tokens[_position];

        public ExpressionNode? ParseWhole()
        {
            var root = ParseExpression();
            if (root is null)
            {
                return null;
            }

            var token = Current;
            return token.Kind switch
            {
                TokenKind.End => root,
                TokenKind.Close => Fail(Messages.ExpressionUnmatchedClose(token.Bracket), token.Column),
                _ => Fail(Messages.ExpressionExpectedOperator(Describe(token)), token.Column),
            };
        }

        private ExpressionNode? ParseExpression()
        {
            var left = ParseTerm();
            while (left is not null && Current.Kind is TokenKind.Plus or TokenKind.Minus)
            {
                var op = Current;
                _position++;
                var right = ParseTerm();
                left = right is null ? null : ExpressionNode.Binary(op.Kind == TokenKind.Plus ? Operation.Add : Operation.Subtract, left, right, op.Column);
            }

            return left;
        }

        private ExpressionNode? ParseTerm()
        {
            var left = ParseUnary();
            while (left is not null && Current.Kind is TokenKind.Star or TokenKind.Slash)
            {
                var op = Current;
                _position++;
                var right = ParseUnary();
                left = right is null ? null : ExpressionNode.Binary(op.Kind == TokenKind.Star ? Operation.Multiply : Operation.Divide, left, right, op.Column);
            }

            return left;
        }

        private ExpressionNode? ParseUnary()
        {
            // Every level of nesting passes through here: parentheses, calls, signs and powers.
            if (++_depth > ExpressionLanguage.MaxDepth)
            {
                return Fail(Messages.ExpressionTooDeep(ExpressionLanguage.MaxDepth), Current.Column);
            }

            ExpressionNode? node;
            var token = Current;
            if (token.Kind is TokenKind.Minus or TokenKind.Plus)
            {
                _position++;
                var operand = ParseUnary();
                node = operand is null || token.Kind == TokenKind.Plus ? operand : ExpressionNode.Unary(Operation.Negate, operand, token.Column);
            }
            else
            {
                node = ParsePower();
            }

            _depth--;
            return node;
        }

        private ExpressionNode? ParsePower()
        {
            var baseNode = ParsePrimary();
            if (baseNode is null || Current.Kind != TokenKind.Power)
            {
                return baseNode;
            }

            var op = Current;
            _position++;
            var exponent = ParseUnary();
            return exponent is null ? null : ExpressionNode.Binary(Operation.Power, baseNode, exponent, op.Column);
        }

        private ExpressionNode? ParsePrimary()
        {
            var token = Current;
            switch (token.Kind)
            {
                case TokenKind.Number:
                    _position++;
                    return ExpressionNode.Constant(token.Number, token.Column);
                case TokenKind.Open:
                    _position++;
                    return ParseGroupRest(token);
                case TokenKind.Name:
                    return ParseName(token);
                default:
                    return Fail(Messages.ExpressionExpectedOperand(Describe(token)), token.Column);
            }
        }

        /// <summary>After an opening bracket: the inner expression and its matching close.</summary>
        private ExpressionNode? ParseGroupRest(Token open)
        {
            var inner = ParseExpression();
            if (inner is null)
            {
                return null;
            }

            var close = Current;
            if (close.Kind == TokenKind.Close)
            {
                var expected = open.Bracket == '(' ? ')' : ']';
                if (close.Bracket != expected)
                {
                    return Fail(Messages.ExpressionMismatchedClose(open.Bracket, open.Column, close.Bracket), close.Column);
                }

                _position++;
                return inner;
            }

            return close.Kind == TokenKind.End
                ? Fail(Messages.ExpressionUnclosed(open.Bracket, open.Column), open.Column)
                : Fail(Messages.ExpressionExpectedOperatorOrClose(Describe(close), open.Bracket == '(' ? ')' : ']'), close.Column);
        }

        private ExpressionNode? ParseName(Token token)
        {
            var name = _text.Substring(token.Column - 1, token.Length);
            _position++;
            var calls = Current.Kind == TokenKind.Open;
            if (ExpressionLanguage.FunctionTable.TryGetValue(name, out var function))
            {
                if (!calls)
                {
                    return Fail(Messages.ExpressionFunctionNeedsArgument(name), token.Column);
                }

                var open = Current;
                _position++;
                var argument = ParseGroupRest(open);
                return argument is null ? null : ExpressionNode.Unary(function, argument, token.Column);
            }

            if (calls)
            {
                return Fail(Messages.ExpressionNotAFunction(name, ExpressionLanguage.Functions), token.Column);
            }

            if (name == ExpressionLanguage.Pi)
            {
                return ExpressionNode.Constant(DoubleDoubleMath.Pi, token.Column);
            }

            if (_variables.TryGetValue(name, out var variable))
            {
                return ExpressionNode.Variable(variable, token.Column);
            }

            if (!_parameters.TryGetValue(name, out var parameter))
            {
                if (_parametersGiven)
                {
                    return Fail(Messages.ExpressionUnknownName(name, ParameterNames, _variables.Keys.Order(StringComparer.Ordinal)), token.Column);
                }

                if (name.Length > 64)
                {
                    return Fail(Messages.ExpressionBadName(name, "parameter", reserved: false), token.Column);
                }

                if (ParameterNames.Count == ExpressionLanguage.MaxParameters)
                {
                    return Fail(Messages.ExpressionTooManyParameters(ParameterNames.Count + 1, ExpressionLanguage.MaxParameters), token.Column);
                }

                parameter = ParameterNames.Count;
                _parameters[name] = parameter;
                ParameterNames.Add(name);
            }

            Used.Add(name);
            return ExpressionNode.Parameter(parameter, token.Column);
        }

        private string Describe(Token token) => token.Kind switch
        {
            TokenKind.End => Messages.ExpressionEndDescription(),
            TokenKind.Number => Messages.ExpressionNumberDescription(_text.Substring(token.Column - 1, token.Length)),
            TokenKind.Name => Messages.ExpressionNameDescription(_text.Substring(token.Column - 1, token.Length)),
            _ => string.Concat("'", _text.AsSpan(token.Column - 1, token.Length), "'"),
        };

        private ExpressionNode? Fail(string message, int column)
        {
            Error ??= new ExpressionError(message, column);
            return null;
        }
    }
}

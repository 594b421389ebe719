package dev.lawful.algebra;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/**
 * An immutable, checked set of laws with its declarations: inputs x, outputs y, constants, definitions, laws,
 * limits (inequalities that hold together with the laws) and optionally which outputs the layer completes. Built
 * from law text ({@link #parse(String, String)}, {@link #read(Path)}) or with {@link #builder()}; both give equal
 * law sets for the same statements, and
 * {@link #toString()} prints law text that parses back to an equal law set.
 *
 * <p>Flat layout: input elements are numbered in declaration order (a vector contributes its elements in order),
 * and so are output elements; {@link #inputNames()} and {@link #outputNames()} give each element's name,
 * {@code name} for a scalar and {@code name[i]} for a vector element. Values are in the declared units.
 *
 * <p>Equality compares the declarations only (not where they came from).
 */
public final class LawSet {
    private final List<Declaration> declarations;
    private final List<Diagnostic> warnings;
    private final Map<String, Checker.LawInfo> lawInfo;
    private final Map<String, Unit> definitionUnits;
    /** Each law's reporting unit, in the units the file declares where a side allows ({@link DeclaredLawUnit}). */
    private final Map<String, Unit> lawUnits = new LinkedHashMap<>();
    private final Map<String, Checker.LawInfo> limitInfo;
    /** Each limit's reporting unit, chosen as for laws with the limited part as the left side. */
    private final Map<String, Unit> limitUnits = new LinkedHashMap<>();
    private final List<Declaration.Variable> inputs = new ArrayList<>();
    private final List<Declaration.Variable> outputs = new ArrayList<>();
    private final Map<String, Integer> inputOffsets = new LinkedHashMap<>();
    private final Map<String, Integer> outputOffsets = new LinkedHashMap<>();
    private final List<String> inputNames = new ArrayList<>();
    private final List<String> outputNames = new ArrayList<>();
    private final ExpandedLaws expanded;
    /** Where each declaration was written, for errors found after checking (not part of equality). */
    private final SourceText source;
    private final Map<Declaration, Span> places = new java.util.IdentityHashMap<>();
    private volatile LawEvaluator evaluator;

    private LawSet(List<Declaration> declarations, Checker checker, Parser.Places places, Diagnostics diagnostics) {
        this.declarations = List.copyOf(declarations);
        this.lawInfo = Collections.unmodifiableMap(new LinkedHashMap<>(checker.laws));
        this.definitionUnits = Collections.unmodifiableMap(new LinkedHashMap<>(checker.definitionUnits));
        DeclaredLawUnit declaredUnit = new DeclaredLawUnit(declarations);
        for (Declaration d : declarations) {
            if (d instanceof Declaration.Law law) {
                lawUnits.put(law.name(), declaredUnit.of(law, lawInfo.get(law.name()).unit()));
            }
        }
        this.limitInfo = Collections.unmodifiableMap(new LinkedHashMap<>(checker.limits));
        for (Declaration.Limit limit : filter(Declaration.Limit.class)) {
            // the limited part is the middle of a chain, else the left part; the unit is preferably its own
            List<Expr> parts = limit.parts();
            Declaration.Law sides = limit.twoSided() ? new Declaration.Law(limit.name(), parts.get(1), parts.get(0))
                    : new Declaration.Law(limit.name(), parts.get(0), parts.get(1));
            limitUnits.put(limit.name(), declaredUnit.of(sides, limitInfo.get(limit.name()).unit()));
        }
        for (Declaration d : declarations) {
            if (d instanceof Declaration.Variable v) {
                boolean in = v.role() == Declaration.Role.INPUT;
                (in ? inputs : outputs).add(v);
                List<String> names = in ? inputNames : outputNames;
                (in ? inputOffsets : outputOffsets).put(v.name(), names.size());
                for (int i = 0; i < v.size(); i++) {
                    names.add(v.vector() ? v.name() + "[" + i + "]" : v.name());
                }
            }
        }
        List<String> all = new ArrayList<>(inputNames);
        all.addAll(outputNames);
        TermPool pool = new TermPool(all.toArray(new String[0]));
        Expander expander = new Expander(this, pool);
        try {
            List<Expander.ScalarLaw> scalarLaws = expander.expand();
            List<ScalarLimit> limits = new LimitAnalysis(this, places, diagnostics).analyse(expander.limits());
            this.expanded = new ExpandedLaws(this, pool, scalarLaws, limits, all.toArray(new String[0]), expander);
        } catch (TermPool.TooLarge tooLarge) {
            diagnostics.error(new Span(0, 0), "the laws expand into more than " + Limits.MAX_SCALAR_NODES
                    + " scalar expression nodes; use fewer or shorter vector laws");
            diagnostics.throwIfErrors();
            throw new AssertionError();
        }
        // the text check sees outputs by name; only the simplified residual shows whether one really takes part
        for (int i = 0; i < expanded.size(); i++) {
            if (expanded.outputs(i).length == 0) {
                Declaration.Law law = expanded.law(i);
                Span at = places.names.get(law);
                diagnostics.error(at == null ? new Span(0, 0) : at, "law '" + expanded.name(i)
                        + "' does not depend on any output once simplified (its residual is "
                        + abbreviate(expanded.residual(i).toString()) + "); a law must constrain at least one output");
            }
        }
        diagnostics.throwIfErrors();
        this.warnings = List.copyOf(diagnostics.all());
        this.source = diagnostics.source();
        for (Declaration d : declarations) {
            Span at = places.names.get(d);
            this.places.put(d, at != null ? at : places.of(d) != null ? places.of(d) : new Span(0, 0));
        }
    }

    /**
     * Builds the library's exception for a problem found after checking (for example by an enforcer: a singular
     * choice of completed outputs), pointing at where {@code about} was written.
     *
     * @param about   the declaration the problem is about, or null for the law set as a whole
     * @param message what was expected, what was found, and the fix
     * @return the exception, ready to throw
     */
    public LawException problem(Declaration about, String message) {
        Diagnostics d = new Diagnostics(source);
        Span at = about == null ? null : places.get(about);
        d.error(at == null ? new Span(0, 0) : at, message);
        return new LawException(d.all(), 0);
    }

    /** @return the law declaration named {@code name} */
    public Declaration.Law law(String name) {
        for (Declaration.Law l : laws()) {
            if (l.name().equals(name)) {
                return l;
            }
        }
        throw new IllegalArgumentException("no law named '" + name + "'");
    }

    private static String abbreviate(String s) {
        return s.length() <= 80 ? s : s.substring(0, 77) + "...";
    }

    /**
     * Parses and checks law text.
     *
     * @param sourceName shown in diagnostics, usually the file name
     * @param text       the law text
     * @return the checked law set
     * @throws LawException with every error found (positions, source lines and carets)
     */
    public static LawSet parse(String sourceName, String text) {
        SourceText source = new SourceText(sourceName, text);
        Diagnostics diagnostics = new Diagnostics(source);
        if (text.length() > Limits.MAX_SOURCE_CHARS) {
            Diagnostics tooLong = new Diagnostics(new SourceText(sourceName, ""));
            tooLong.error(new Span(0, 0), "law text of " + text.length() + " characters exceeds the limit of "
                    + Limits.MAX_SOURCE_CHARS);
            tooLong.throwIfErrors();
        }
        Parser.Result parsed = new Parser(diagnostics).parseFile();
        Checker checker = new Checker(diagnostics, parsed.places());
        checker.check(parsed.declarations());
        diagnostics.throwIfErrors();
        return new LawSet(parsed.declarations(), checker, parsed.places(), diagnostics);
    }

    /**
     * Reads, parses and checks a law file (UTF-8).
     *
     * @throws IOException when the file cannot be read
     * @throws LawException with every error found, or when the file is larger than the source limit
     */
    public static LawSet read(Path file) throws IOException {
        String name = file.toString();
        long size = Files.size(file);
        if (size > 4L * Limits.MAX_SOURCE_CHARS) {
            Diagnostics d = new Diagnostics(new SourceText(name, ""));
            d.error(new Span(0, 0), "law file of " + size + " bytes exceeds the limit of " + Limits.MAX_SOURCE_CHARS
                    + " characters");
            d.throwIfErrors();
        }
        return parse(name, decode(name, Files.readAllBytes(file)));
    }

    /** Strict UTF-8: a wrongly encoded file is an error that says where, never silently replaced characters. */
    private static String decode(String name, byte[] bytes) {
        java.nio.charset.CharsetDecoder decoder = StandardCharsets.UTF_8.newDecoder()
                .onMalformedInput(java.nio.charset.CodingErrorAction.REPORT)
                .onUnmappableCharacter(java.nio.charset.CodingErrorAction.REPORT);
        java.nio.ByteBuffer in = java.nio.ByteBuffer.wrap(bytes);
        java.nio.CharBuffer out = java.nio.CharBuffer.allocate(bytes.length + 1);
        java.nio.charset.CoderResult result = decoder.decode(in, out, true);
        if (result.isError()) {
            int bad = in.position();
            String lenient = new String(bytes, StandardCharsets.UTF_8);
            int offset = new String(bytes, 0, bad, StandardCharsets.UTF_8).length();
            Diagnostics d = new Diagnostics(new SourceText(name, lenient));
            d.error(new Span(offset, 1), String.format("the file is not valid UTF-8: byte 0x%02X cannot start or"
                    + " continue a character here; save the law file as UTF-8", bytes[bad] & 0xff));
            d.throwIfErrors();
        }
        decoder.flush(out);
        out.flip();
        return out.toString();
    }

    /** @return a builder that assembles a law set statement by statement */
    public static LawSetBuilder builder() {
        return new LawSetBuilder();
    }

    /**
     * Checks declarations that were assembled in Java (for example read back from a saved model).
     *
     * @throws LawException when they do not form a valid law set; positions refer to their printed text
     */
    public static LawSet of(List<Declaration> declarations) {
        return parse("<declarations>", render(declarations));
    }

    private static String render(List<Declaration> declarations) {
        StringBuilder sb = new StringBuilder();
        for (Declaration d : declarations) {
            sb.append(d.text()).append('\n');
        }
        return sb.toString();
    }

    // ---- declarations ----------------------------------------------------------------------------------------

    /** @return every declaration in order */
    public List<Declaration> declarations() {
        return declarations;
    }

    /** @return the inputs in declaration order */
    public List<Declaration.Variable> inputs() {
        return Collections.unmodifiableList(inputs);
    }

    /** @return the outputs in declaration order */
    public List<Declaration.Variable> outputs() {
        return Collections.unmodifiableList(outputs);
    }

    /** @return the constants in declaration order */
    public List<Declaration.Constant> constants() {
        return filter(Declaration.Constant.class);
    }

    /** @return the definitions in declaration order */
    public List<Declaration.Definition> definitions() {
        return filter(Declaration.Definition.class);
    }

    /** @return the laws in declaration order */
    public List<Declaration.Law> laws() {
        return filter(Declaration.Law.class);
    }

    /** @return the limits in declaration order */
    public List<Declaration.Limit> limits() {
        return filter(Declaration.Limit.class);
    }

    /** @return the {@code complete} statement, when there is one */
    public Optional<Declaration.Completion> completion() {
        List<Declaration.Completion> c = filter(Declaration.Completion.class);
        return c.isEmpty() ? Optional.empty() : Optional.of(c.get(0));
    }

    private <T extends Declaration> List<T> filter(Class<T> type) {
        List<T> out = new ArrayList<>();
        for (Declaration d : declarations) {
            if (type.isInstance(d)) {
                out.add(type.cast(d));
            }
        }
        return Collections.unmodifiableList(out);
    }

    /** @return warnings found while checking (none make the law set invalid) */
    public List<Diagnostic> warnings() {
        return warnings;
    }

    // ---- layout ----------------------------------------------------------------------------------------------

    /** @return the number of input elements per sample */
    public int inputWidth() {
        return inputNames.size();
    }

    /** @return the number of output elements per sample */
    public int outputWidth() {
        return outputNames.size();
    }

    /** @return the name of every input element: {@code name} or {@code name[i]} */
    public List<String> inputNames() {
        return Collections.unmodifiableList(inputNames);
    }

    /** @return the name of every output element: {@code name} or {@code name[i]} */
    public List<String> outputNames() {
        return Collections.unmodifiableList(outputNames);
    }

    /** @return the flat index of the first element of input {@code name} */
    public int inputOffset(String name) {
        return offset(inputOffsets, name, "input");
    }

    /** @return the flat index of the first element of output {@code name} */
    public int outputOffset(String name) {
        return offset(outputOffsets, name, "output");
    }

    private static int offset(Map<String, Integer> offsets, String name, String what) {
        Integer o = offsets.get(name);
        if (o == null) {
            String near = Names.nearest(name, offsets.keySet());
            throw new IllegalArgumentException("no " + what + " named '" + name + "'"
                    + (near == null ? "" : "; did you mean '" + near + "'?"));
        }
        return o;
    }

    /**
     * @return the output element indices named by the {@code complete} statement, in the order written (empty
     *         when there is none)
     */
    public int[] completedOutputs() {
        Optional<Declaration.Completion> c = completion();
        if (c.isEmpty()) {
            return new int[0];
        }
        List<Integer> out = new ArrayList<>();
        for (Expr t : c.get().targets()) {
            if (t instanceof Expr.Name n) {
                int o = outputOffset(n.name());
                int size = outputs.stream().filter(v -> v.name().equals(n.name())).findFirst().orElseThrow().size();
                for (int i = 0; i < size; i++) {
                    out.add(o + i);
                }
            } else if (t instanceof Expr.Index i) {
                out.add(outputOffset(i.name()) + i.index());
            } else {
                Expr.Slice s = (Expr.Slice) t;
                for (int i = s.from(); i < s.to(); i++) {
                    out.add(outputOffset(s.name()) + i);
                }
            }
        }
        return out.stream().mapToInt(Integer::intValue).toArray();
    }

    // ---- laws ------------------------------------------------------------------------------------------------

    /**
     * @return the unit residuals of law {@code name} are reported in (one unit for every element of a vector law):
     *         the declared unit of its left side when that side is in one declared unit (or else its right side's);
     *         otherwise, when a side is one product of declared quantities with no sum, the product of their units
     *         ({@code ohm MW} for R in ohm times P in MW); otherwise the coherent SI unit of its dimension
     *         ({@code W m-2}). Its factor is that of its text, so a residual in this unit is residual_SI / factor.
     *         The order of preference is in the package-private DeclaredLawUnit.
     */
    public Unit lawUnit(String name) {
        Unit unit = lawUnits.get(name);
        if (unit == null) {
            throw new IllegalArgumentException("no law named '" + name + "'");
        }
        return unit;
    }

    /**
     * @return the unit of definition {@code name}: the declared unit its value follows from (as in {@code let q =
     *         2 * out} with {@code out} in mol/s), otherwise the coherent SI unit of its dimension
     */
    public Unit definitionUnit(String name) {
        Unit u = definitionUnits.get(name);
        if (u == null) {
            throw new IllegalArgumentException("no definition named '" + name + "'");
        }
        return u;
    }

    /** @return the number of elements of law {@code name}: 0 for a scalar law, k for a vector law of length k */
    public int lawShape(String name) {
        Checker.LawInfo info = lawInfo.get(name);
        if (info == null) {
            throw new IllegalArgumentException("no law named '" + name + "'");
        }
        return info.shape();
    }

    /**
     * @return the unit the scalar limits of limit {@code name} are reported in, chosen as {@link #lawUnit} chooses a
     *         law's with the limited part (the middle of {@code lo <= e <= hi}, else the left part) as the left side
     * @throws IllegalArgumentException when there is no limit of that name
     */
    public Unit limitUnit(String name) {
        Unit unit = limitUnits.get(name);
        if (unit == null) {
            throw new IllegalArgumentException("no limit named '" + name + "'");
        }
        return unit;
    }

    /**
     * @return the number of elements of limit {@code name}: 0 for a scalar limit, k for a vector limit of length k
     *         (a two-sided limit has two scalar limits per element)
     * @throws IllegalArgumentException when there is no limit of that name
     */
    public int limitShape(String name) {
        Checker.LawInfo info = limitInfo.get(name);
        if (info == null) {
            throw new IllegalArgumentException("no limit named '" + name + "'");
        }
        return info.shape();
    }

    /** @return the laws expanded into scalar residual terms with their sparsity and derivatives */
    public ExpandedLaws expand() {
        return expanded;
    }

    /** @return the compiled batch evaluator of residuals and Jacobians (compiled once, then shared) */
    public LawEvaluator evaluator() {
        LawEvaluator e = evaluator;
        if (e == null) {
            synchronized (this) {
                e = evaluator;
                if (e == null) {
                    e = LawEvaluator.compile(expanded);
                    evaluator = e;
                }
            }
        }
        return e;
    }

    /**
     * Expands one scalar expression in the scope of this law set, so it can be evaluated and differentiated with
     * respect to any input or output element.
     *
     * @param expression law-language text, such as {@code sum(C * out) / T}
     * @return its scalar term over this law set's variables (inputs then outputs, SI units)
     * @throws LawException when the expression is invalid here or is a vector
     */
    public Term expression(String expression) {
        String name = "expression_";
        while (inputOffsets.containsKey(name) || outputOffsets.containsKey(name) || lawInfo.containsKey(name)
                || toString().contains(name)) {
            name = name + "_";
        }
        String prefix = "let " + name + " = ";
        String text = toString() + prefix + expression.replace('\n', ' ').replace('\r', ' ') + "\n";
        int lineStart = text.length() - 1 - expression.length() - prefix.length();
        LawSet extended;
        try {
            extended = parse("<expression>", text);
        } catch (LawException e) {
            // report against the expression alone
            Diagnostics d = new Diagnostics(new SourceText("<expression>", expression));
            for (Diagnostic diag : e.errors()) {
                int offset = Math.max(0, Math.min(diag.span().offset() - lineStart - prefix.length(), expression.length()));
                d.error(new Span(offset, Math.min(diag.span().length(), expression.length() - offset)), diag.message());
            }
            d.throwIfErrors();
            throw e;
        }
        ExpandedLaws ex = extended.expand();
        if (ex.definitionShape(name) != 0) {
            Diagnostics d = new Diagnostics(new SourceText("<expression>", expression));
            d.error(new Span(0, expression.length()), "expected a scalar expression, found "
                    + ExprRules.shapeText(ex.definitionShape(name)));
            d.throwIfErrors();
        }
        return ex.definition(name).get(0);
    }

    // ---- text ------------------------------------------------------------------------------------------------

    /** @return law text, one declaration per line, that parses back to an equal law set */
    @Override
    public String toString() {
        return render(declarations);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof LawSet l && l.declarations.equals(declarations);
    }

    @Override
    public int hashCode() {
        return declarations.hashCode();
    }
}

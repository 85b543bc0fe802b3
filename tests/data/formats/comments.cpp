// Raw strings may hold comment markers.
auto text = R"json({"a": "// not"})json"; // after the raw string
/* Block comment before the class. */
class Reader {};

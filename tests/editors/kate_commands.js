var katescript = {
    "author": "calami tests",
    "license": "MIT",
    "revision": 1,
    "kate-version": "5.1",
    "functions": ["calamigoto", "calamistate"]
};

// Kate command-line commands (F7) that tests/editors/test_kate.py uses to
// place the cursor and to read the buffer back, through Kate's own
// scripting API (KTextEditor); installed into the test's private data
// folder.  Each command prints one line on Kate's stderr: "calami-test "
// and a JSON object.  (Kate reads the header above before anything else.)
require("range.js");

function report(what) {
    debug("calami-test " + JSON.stringify(what));
}

// calamigoto LINE COLUMN (0-based, as KTextEditor counts)
function calamigoto(line, column) {
    view.setCursorPosition(parseInt(line, 10), parseInt(column, 10));
    calamistate();
}

function calamistate() {
    var c = view.cursorPosition();
    report({"line": c.line, "column": c.column, "modified": document.isModified(), "text": document.text()});
}

function help(cmd) {
    return "calami test helper: " + cmd;
}

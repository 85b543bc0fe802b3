/**
 * Reads settings from the environment.
 */
public class Settings {
    // The default timeout in seconds.
    String block = """
        text block // not a comment
        """; // after the text block
    char c = '/'; /* a slash */
}

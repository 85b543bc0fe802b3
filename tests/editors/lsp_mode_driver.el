;;; lsp_mode_driver.el --- Drives Emacs + lsp-mode for tests/editors/test_emacs_lsp_mode.py  -*- lexical-binding: t; -*-

;; Run as: emacs --batch -l lsp_mode_driver.el
;; Loads editor-configs/emacs/calami-lsp-mode.el the way its README says
;; (after lsp-mode, `lsp-deferred' on `markdown-mode-hook'), opens one demo
;; file, waits for the Flymake diagnostics, picks the preferred quick fix
;; from `lsp-execute-code-action''s menu, then the "add to the project's
;; list" action on a second word, and writes everything it saw to JSON.
;; Environment: CALAMI_TEST_CONFIGS (editor-configs/emacs), CALAMI_EMACS_CMD
;; (server command, words separated by spaces; unset: the config's
;; default), CALAMI_TEST_FILE, CALAMI_TEST_OUT, CALAMI_TEST_FIX and
;; CALAMI_TEST_ADD ("line:col", 1-based line, 0-based character column),
;; CALAMI_TEST_ADD_TITLE (the menu entry to pick for the second word),
;; CALAMI_TEST_WORD_LIST (the file that entry edits), CALAMI_TEST_SCENARIO
;; ("full", or "start-only": open the file and report what the user is
;; told), CALAMI_TEST_TIMEOUT_MS (one budget for all the waiting).

(require 'json)
(require 'cl-lib)
(package-initialize)                    ; what a normal start-up does
(add-to-list 'load-path (getenv "CALAMI_TEST_CONFIGS"))
;; The README's set-up, verbatim apart from the command override.
(with-eval-after-load 'lsp-mode (require 'calami-lsp-mode))
(add-hook 'markdown-mode-hook #'lsp-deferred)
(require 'lsp-mode)
(when (getenv "CALAMI_EMACS_CMD")
  (setq lsp-calami-server-command (split-string (getenv "CALAMI_EMACS_CMD") " " t)))

(defvar driver-deadline
  (+ (float-time) (/ (string-to-number (or (getenv "CALAMI_TEST_TIMEOUT_MS") "60000")) 1000.0)))
(defvar driver-result (list (cons 'errors [])))
(defvar driver-questions nil "Questions lsp-mode asked (answered with no).")

(defun driver-put (key value)
  "Set KEY in the result (replacing an earlier value: JSON keeps one)."
  (setf (alist-get key driver-result) value))

(defun driver-run-idle-timers ()
  "Run pending idle timers, as a pause in typing would; batch Emacs is never idle."
  (dolist (timer (copy-sequence timer-idle-list))
    (timer-event-handler timer)))

(defun driver-wait (condition)
  "Process events until CONDITION returns non-nil or the deadline passes."
  (let (value)
    (while (and (not (setq value (funcall condition)))
                (< (float-time) driver-deadline))
      (accept-process-output nil 0.05)
      (driver-run-idle-timers))
    value))

;; lsp-mode asks before restarting a server that exited; a user says no.
(advice-add 'y-or-n-p :override (lambda (prompt &rest _) (push prompt driver-questions) nil))
(advice-add 'yes-or-no-p :override (lambda (prompt &rest _) (push prompt driver-questions) nil))

(defun driver-diagnostics ()
  "The Flymake diagnostics in the current buffer, with the LSP code and severity."
  (let ((raw (and buffer-file-name
                  (gethash (lsp--fix-path-casing buffer-file-name) (lsp-diagnostics t))))
        out)
    (dolist (d (flymake-diagnostics))
      (let* ((beg (flymake-diagnostic-beg d))
             (end (flymake-diagnostic-end d))
             (line (line-number-at-pos beg))
             (col (save-excursion (goto-char beg) (- beg (line-beginning-position))))
             (lsp (cl-find-if (lambda (r)
                                (let ((start (lsp:range-start (lsp:diagnostic-range r))))
                                  (and (= (lsp:position-line start) (1- line))
                                       (= (lsp:position-character start) col))))
                              raw)))
        (push `((line . ,line) (col . ,col) (length . ,(- end beg))
                (text . ,(flymake-diagnostic-text d))
                (type . ,(symbol-name (flymake-diagnostic-type d)))
                (source . ,(and lsp (lsp:diagnostic-source? lsp)))
                (code . ,(and lsp (lsp:diagnostic-code? lsp)))
                (severity . ,(and lsp (lsp:diagnostic-severity? lsp))))
              out)))
    (sort out (lambda (a b) (or (< (alist-get 'line a) (alist-get 'line b))
                                (and (= (alist-get 'line a) (alist-get 'line b))
                                     (< (alist-get 'col a) (alist-get 'col b))))))))

(defun driver-goto (spec)
  "Move point to SPEC, \"line:col\" (1-based line, 0-based column)."
  (let ((parts (split-string spec ":")))
    (goto-char (point-min))
    (forward-line (1- (string-to-number (car parts))))
    (forward-char (string-to-number (cadr parts)))
    (cons (string-to-number (car parts)) (string-to-number (cadr parts)))))

(defun driver-flagged-at-p (pos)
  (cl-find-if (lambda (d) (and (= (alist-get 'line d) (car pos)) (= (alist-get 'col d) (cdr pos))))
              (driver-diagnostics)))

(defun driver-code-action (choose)
  "Run `lsp-execute-code-action' as a user does; CHOOSE picks from the menu.
CHOOSE gets the menu as (TITLE . ACTION) pairs and returns a title.
Returns (PROMPT TITLES PREFERRED-TITLES)."
  (let (prompt titles preferred)
    (cl-letf (((symbol-function 'completing-read)
               (lambda (p collection &rest _)
                 (setq prompt p
                       titles (mapcar #'car collection)
                       preferred (mapcar #'car (cl-remove-if-not
                                                (lambda (c) (lsp:code-action-is-preferred? (cdr c)))
                                                collection)))
                 (funcall choose collection))))
      (call-interactively #'lsp-execute-code-action))
    (list prompt titles preferred)))

(defun driver-calami-workspace (&optional status)
  "The buffer's calami workspace (with STATUS, when given), or nil."
  (cl-find-if (lambda (w) (and (eq (lsp--workspace-server-id w) 'calami)
                               (or (null status) (eq (lsp--workspace-status w) status))))
              (lsp-workspaces)))

(defun driver-failed-p ()
  "Non-nil once the user has been told that calami could not start."
  (or driver-questions                  ; "restart the server?" after it exited
      (with-current-buffer (get-buffer-create "*Warnings*") (> (buffer-size) 0))))

(defun driver-run ()
  (lsp-workspace-folders-add default-directory) ; what lsp-mode's first-time "import project root" question does
  (find-file (getenv "CALAMI_TEST_FILE"))
  (driver-put 'major_mode (symbol-name major-mode))
  (driver-run-idle-timers)              ; `lsp-deferred' starts from an idle timer
  (driver-wait (lambda () (or (driver-calami-workspace 'initialized) (driver-failed-p))))
  (driver-put 'started (and (driver-calami-workspace 'initialized) t))
  (let ((workspace (driver-calami-workspace)))
    (driver-put 'server_command
                (and workspace (vconcat (process-command (lsp--workspace-proc workspace))))))
  (unless (equal (getenv "CALAMI_TEST_SCENARIO") "start-only")
    (driver-run-full)))

(defun driver-run-full ()
  (driver-put 'provider (format "%s" lsp-diagnostics-provider))
  (driver-put 'found (and (driver-wait (lambda () (flymake-start) (driver-diagnostics))) t))
  (driver-put 'diagnostics (vconcat (driver-diagnostics)))

  ;; The preferred fix: point on the word, the code-action menu, the entry
  ;; the server marked preferred.
  (let* ((before (buffer-substring-no-properties (point-min) (point-max)))
         (tick (buffer-chars-modified-tick))
         (pos (driver-goto (getenv "CALAMI_TEST_FIX")))
         (menu (driver-code-action
                (lambda (collection)
                  (car (or (cl-find-if (lambda (c) (lsp:code-action-is-preferred? (cdr c))) collection)
                           (error "no preferred action in the menu")))))))
    (driver-run-idle-timers)
    (driver-put 'menu_prompt (nth 0 menu))
    (driver-put 'menu_choices (vconcat (nth 1 menu)))
    (driver-put 'menu_preferred (vconcat (nth 2 menu)))
    (driver-put 'text_before before)
    (driver-put 'changed (/= tick (buffer-chars-modified-tick)))
    (driver-put 'text_after (buffer-substring-no-properties (point-min) (point-max)))
    (driver-put 'modified (and (buffer-modified-p) t))
    (let ((profile (expand-file-name "profile.msgpack" (getenv "CALAMI_PROFILE_DIR"))))
      (driver-put 'recorded (and (driver-wait (lambda () (file-exists-p profile))) t)))
    (driver-put 'rechecked (and (driver-wait (lambda ()
                                               (flymake-start)
                                               (and (driver-diagnostics) (not (driver-flagged-at-p pos)))))
                                t))
    (driver-put 'diagnostics_after_fix (vconcat (driver-diagnostics))))

  ;; "Add to the project lexicon" on a second word.
  (let* ((title (getenv "CALAMI_TEST_ADD_TITLE"))
         (word-list (getenv "CALAMI_TEST_WORD_LIST"))
         (listed-before (and (file-exists-p word-list)
                             (with-temp-buffer (insert-file-contents word-list) (buffer-string))))
         (pos (driver-goto (getenv "CALAMI_TEST_ADD")))
         (menu (driver-code-action
                (lambda (collection)
                  (car (or (assoc title collection) (error "no %S in the menu" title)))))))
    (driver-run-idle-timers)
    (driver-put 'add_menu_choices (vconcat (nth 1 menu)))
    (driver-put 'word_list_written
                (and (driver-wait (lambda ()
                                    (and (file-exists-p word-list)
                                         (not (equal listed-before
                                                     (with-temp-buffer (insert-file-contents word-list)
                                                                       (buffer-string)))))))
                     t))
    (driver-put 'add_rechecked (and (driver-wait (lambda ()
                                                   (flymake-start)
                                                   (and (driver-diagnostics) (not (driver-flagged-at-p pos)))))
                                    t))
    (driver-put 'diagnostics_after_add (vconcat (driver-diagnostics)))
    (driver-put 'text_final (buffer-substring-no-properties (point-min) (point-max)))))

(condition-case err
    (driver-run)
  (error (driver-put 'errors (vector (error-message-string err)))))
(driver-put 'questions (vconcat driver-questions))
(driver-put 'warnings (with-current-buffer (get-buffer-create "*Warnings*")
                        (buffer-substring-no-properties (point-min) (point-max))))
(driver-put 'messages (with-current-buffer (messages-buffer)
                        (buffer-substring-no-properties (point-min) (point-max))))
(driver-put 'server_error (lsp-calami-last-error))
(driver-put 'server_stderr
            (mapconcat (lambda (buffer)
                         (with-current-buffer buffer
                           (buffer-substring-no-properties (max (point-min) (- (point-max) 3000))
                                                           (point-max))))
                       (cl-remove-if-not (lambda (b) (string-match-p "calami.*stderr" (buffer-name b)))
                                         (buffer-list))
                       "\n"))
(with-temp-file (getenv "CALAMI_TEST_OUT")
  (insert (json-encode driver-result)))
(kill-emacs 0)
;;; lsp_mode_driver.el ends here

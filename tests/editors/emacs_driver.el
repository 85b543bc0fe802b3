;;; emacs_driver.el --- Drives Emacs + Eglot for tests/editors/test_emacs.py  -*- lexical-binding: t; -*-

;; Run as: emacs --batch -l emacs_driver.el
;; Loads editor-configs/emacs/calami-eglot.el as a user would, opens one
;; demo file, waits for calami's Flymake diagnostics, then applies the
;; preferred quick fix through `eglot-code-actions' (answering its prompt
;; with the default, as a user pressing RET does) and writes everything it
;; saw to a JSON file.
;; Then it picks "add to the project lexicon" for a second word from the
;; same menu.
;; Environment: CALAMI_TEST_CONFIGS (editor-configs/emacs), CALAMI_EMACS_CMD
;; (server command, words separated by spaces; unset: the config's
;; default), CALAMI_TEST_FILE, CALAMI_TEST_OUT, CALAMI_TEST_FIX and
;; CALAMI_TEST_ADD ("line:col", 1-based line, 0-based character column of
;; the word to fix / to add), CALAMI_TEST_ADD_TITLE (the menu entry to pick),
;; CALAMI_TEST_WORD_LIST (the file it edits), CALAMI_TEST_SCENARIO ("full",
;; or "start-only": open the file and report what the user is told),
;; CALAMI_TEST_TIMEOUT_MS (one budget for all the waiting).

(require 'json)
(require 'cl-lib)
(package-initialize)                    ; what a normal start-up does
(add-to-list 'load-path (getenv "CALAMI_TEST_CONFIGS"))
(require 'calami-eglot)
(when (getenv "CALAMI_EMACS_CMD")
  (setq calami-eglot-program (split-string (getenv "CALAMI_EMACS_CMD") " " t)))
(calami-eglot-ensure)

;; Interactive Emacs reports an error in a process sentinel in the echo area
;; as "error in process sentinel: ..." and goes on; batch Emacs exits.  Do
;; what the interactive one does.
(advice-add 'jsonrpc--process-sentinel :around
            (lambda (sentinel &rest args)
              (condition-case err
                  (apply sentinel args)
                (error (message "error in process sentinel: %s" (error-message-string err))))))

(defvar driver-deadline
  (+ (float-time) (/ (string-to-number (or (getenv "CALAMI_TEST_TIMEOUT_MS") "60000")) 1000.0)))
(defvar driver-result (list (cons 'errors [])))

(defun driver-put (key value)
  "Set KEY in the result (replacing an earlier value: JSON keeps one)."
  (setf (alist-get key driver-result) value))

(defvar driver-event-errors nil
  "Errors raised while Emacs processed output (shown in the echo area interactively).")

(defun driver-wait (condition)
  "Process events until CONDITION returns non-nil or the deadline passes."
  (let (value)
    (while (and (not (setq value (funcall condition)))
                (< (float-time) driver-deadline))
      (condition-case err
          (accept-process-output nil 0.05)
        (error (push (error-message-string err) driver-event-errors))))
    value))

(defun driver-calami-diagnostics ()
  "calami's Flymake diagnostics in the current buffer, as alists."
  (let (out)
    (dolist (d (flymake-diagnostics))
      (let ((text (flymake-diagnostic-text d))
            (beg (flymake-diagnostic-beg d))
            (end (flymake-diagnostic-end d)))
        (when (string-prefix-p "calami" text)
          (save-excursion
            (goto-char beg)
            (push `((line . ,(line-number-at-pos beg))
                    (col . ,(- beg (line-beginning-position)))
                    (length . ,(- end beg))
                    (text . ,text)
                    (type . ,(symbol-name (flymake-diagnostic-type d))))
                  out)))))
    (sort out (lambda (a b) (or (< (alist-get 'line a) (alist-get 'line b))
                                (and (= (alist-get 'line a) (alist-get 'line b))
                                     (< (alist-get 'col a) (alist-get 'col b))))))))

(defun driver-run ()
  (find-file (getenv "CALAMI_TEST_FILE"))
  (driver-put 'major_mode (symbol-name major-mode))
  ;; `eglot-ensure' connects after the next command; in batch there is no
  ;; command loop, so end a "command" by hand.
  ;; Interactive Emacs shows an error in post-command-hook in the echo area
  ;; and goes on; batch Emacs would stop.
  (condition-case err
      (run-hooks 'post-command-hook)
    (error (message "Error in post-command-hook: %s" (error-message-string err))))
  (if (equal (getenv "CALAMI_TEST_SCENARIO") "start-only")
      (driver-put 'managed
                  (and (driver-wait (lambda ()
                                      (or (bound-and-true-p eglot--managed-mode)
                                          (string-match-p "calami: " (driver-messages)))))
                       (bound-and-true-p eglot--managed-mode)
                       t))
    (driver-run-full)))

(defun driver-messages ()
  (with-current-buffer (messages-buffer)
    (buffer-substring-no-properties (point-min) (point-max))))

(defun driver-pick (title)
  "Open the quick-fix menu at point and take TITLE from it; return the menu."
  (let (choices)
    (cl-letf (((symbol-function 'completing-read)
               (lambda (_p collection &rest _)
                 (setq choices (mapcar #'car collection))
                 (or (car (assoc title collection)) (error "no %S in the menu" title)))))
      (let ((last-nonmenu-event ?\r))
        (eglot-code-actions (point) (point) "quickfix" t)))
    (dolist (timer (copy-sequence timer-idle-list))
      (timer-event-handler timer))
    choices))

(defun driver-run-full ()
  (driver-put 'managed (and (driver-wait (lambda () (bound-and-true-p eglot--managed-mode))) t))
  (let ((server (eglot-current-server)))
    (driver-put 'server_command (and server (process-command (jsonrpc--process server)))))
  (driver-put 'found (and (driver-wait (lambda ()
                                         (or (driver-calami-diagnostics)
                                             (progn (flymake-start) nil))))
                          t))
  (driver-put 'diagnostics (vconcat (driver-calami-diagnostics)))

  ;; The fix: point on the word, then the quick-fix menu; take its default.
  (let* ((fix (split-string (getenv "CALAMI_TEST_FIX") ":"))
         (before (buffer-substring-no-properties (point-min) (point-max)))
         (tick (buffer-chars-modified-tick))
         prompt choices)
    (goto-char (point-min))
    (forward-line (1- (string-to-number (car fix))))
    (forward-char (string-to-number (cadr fix)))
    (cl-letf (((symbol-function 'completing-read)
               (lambda (p collection &optional _pred _req _init _hist def &rest _)
                 (setq prompt p choices (mapcar #'car collection))
                 def)))
      (let ((last-nonmenu-event ?\r))   ; a key, not a mouse click: no popup menu
        (eglot-code-actions (point) (point) "quickfix" t)))
    ;; Eglot sends the edit to the server from an idle timer; batch Emacs is
    ;; never idle, so run those timers as a pause in typing would.
    (dolist (timer (copy-sequence timer-idle-list))
      (timer-event-handler timer))
    (driver-put 'menu_prompt prompt)
    (driver-put 'menu_choices (vconcat choices))
    (driver-put 'text_before before)
    (driver-put 'changed (/= tick (buffer-chars-modified-tick)))
    (driver-put 'text_after (buffer-substring-no-properties (point-min) (point-max)))
    (driver-put 'modified (and (buffer-modified-p) t))
    (let ((profile (expand-file-name "profile.msgpack" (getenv "CALAMI_PROFILE_DIR"))))
      (driver-put 'recorded (and (driver-wait (lambda () (file-exists-p profile))) t)))
    ;; After the edit the server checks again; the fixed word's hint goes.
    (let ((line (string-to-number (car fix))) (col (string-to-number (cadr fix))))
      (driver-put 'rechecked
                  (and (driver-wait
                        (lambda ()
                          (flymake-start)
                          (let ((diags (driver-calami-diagnostics)))
                            (and diags
                                 (not (cl-find-if (lambda (d) (and (= (alist-get 'line d) line)
                                                                   (= (alist-get 'col d) col)))
                                                  diags))))))
                       t))
      (driver-put 'diagnostics_after (vconcat (driver-calami-diagnostics)))))

  ;; "Add to the project lexicon" on a second word.
  (let* ((spec (split-string (getenv "CALAMI_TEST_ADD") ":"))
         (line (string-to-number (car spec)))
         (col (string-to-number (cadr spec)))
         (word-list (getenv "CALAMI_TEST_WORD_LIST"))
         (read-list (lambda () (and (file-exists-p word-list)
                                    (with-temp-buffer (insert-file-contents word-list) (buffer-string)))))
         (listed-before (funcall read-list)))
    (goto-char (point-min))
    (forward-line (1- line))
    (forward-char col)
    (driver-put 'add_menu_choices (vconcat (driver-pick (getenv "CALAMI_TEST_ADD_TITLE"))))
    (driver-put 'word_list_written
                (and (driver-wait (lambda () (let ((now (funcall read-list)))
                                               (and now (not (equal now listed-before))))))
                     t))
    (driver-put 'add_rechecked
                (and (driver-wait
                      (lambda ()
                        (flymake-start)
                        (let ((diags (driver-calami-diagnostics)))
                          (and diags
                               (not (cl-find-if (lambda (d) (and (= (alist-get 'line d) line)
                                                                 (= (alist-get 'col d) col)))
                                                diags))))))
                     t))
    (driver-put 'diagnostics_after_add (vconcat (driver-calami-diagnostics)))
    (driver-put 'text_final (buffer-substring-no-properties (point-min) (point-max)))))

(condition-case err
    (driver-run)
  (error (driver-put 'errors (vector (error-message-string err)))))
(driver-put 'server_error (calami-eglot-last-error))
(driver-put 'messages (driver-messages))
(driver-put 'server_stderr
            (mapconcat (lambda (buffer)
                         (with-current-buffer buffer
                           (buffer-substring-no-properties (max (point-min) (- (point-max) 3000))
                                                           (point-max))))
                       (cl-remove-if-not (lambda (b) (string-match-p "EGLOT.*stderr" (buffer-name b)))
                                         (buffer-list))
                       "\n"))
(with-temp-file (getenv "CALAMI_TEST_OUT")
  (insert (json-encode driver-result)))
(kill-emacs 0)
;;; emacs_driver.el ends here

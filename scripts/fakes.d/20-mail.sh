# The local mail stand-in (maildev): SMTP and its web/API bound to 127.0.0.1 only.
start_fake_mail() {
  if [ "${SMTP_URL:-}" != "smtp://127.0.0.1:$SMTP_PORT" ]; then
    log "Mail: sending through ${SMTP_URL%%@*}… (no local stand-in)"
    return 0
  fi
  mkdir -p "$RUN_DIR/mail"
  start_service mail node_modules/.bin/maildev --ip 127.0.0.1 --web-ip 127.0.0.1 -s "$SMTP_PORT" -w "$MAIL_WEB_PORT" --mail-directory "$RUN_DIR/mail" --silent
  wait_http "$MAIL_WEB_URL/email" mail
  log "Mail stand-in: SMTP 127.0.0.1:$SMTP_PORT, messages at $MAIL_WEB_URL"
}

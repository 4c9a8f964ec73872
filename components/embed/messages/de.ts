/** Die festen Texte des Rechners auf Deutsch (Sie-Form). */
import { joinNames, type Messages } from './en';

const unitAfter = (unit: string) => (unit ? ` ${unit}` : '');

export const de: Messages = {
  intro: 'Geben Sie Ihre Werte ein, um zu sehen, wie sehr sie den einzelnen Gruppen ähneln.',
  optionalMark: 'freiwillig',
  optionalHint: 'Sie können dieses Feld leer lassen.',
  accepted: (min, max, unit) => `Zulässig: ${min} bis ${max}${unitAfter(unit)}.`,
  fieldRequired: (label) => `Bitte geben Sie einen Wert für ${label} ein.`,
  notNumber: (label, example) => `${label} muss eine Zahl sein, geschrieben zum Beispiel als ${example}.`,
  ambiguous: (label, example) => `${label} lässt sich auf mehr als eine Weise lesen. Bitte schreiben Sie die Zahl wie ${example}.`,
  outOfRange: (label, min, max, unit) => `${label} muss zwischen ${min} und ${max}${unitAfter(unit)} liegen.`,
  fieldRefused: (label) => `${label} konnte nicht verwendet werden. Bitte prüfen Sie den Wert.`,
  submit: 'Meine Gruppen zeigen',
  busy: 'Wird berechnet…',
  resultLabel: 'Ergebnis',
  alreadyShown: 'Die Antwort unten gilt bereits für diese Werte. Ändern Sie einen Wert, um eine neue zu erhalten.',
  someValuesUnusable: 'Einige Werte konnten nicht verwendet werden.',
  tooMany: (seconds) => `Das waren viele Versuche in kurzer Zeit. Bitte warten Sie ${seconds ? `${seconds} Sekunden` : 'einen Moment'} und versuchen Sie es dann erneut.`,
  paused: 'Dieser Rechner macht eine kurze Pause und antwortet bald wieder. Mit Ihren Werten ist alles in Ordnung.',
  gone: 'Dieser Rechner ist nicht mehr verfügbar.',
  serverProblem: 'Bei uns ist etwas schiefgegangen. Bitte versuchen Sie es erneut.',
  offline: 'Die Antwort konnte nicht abgerufen werden. Bitte prüfen Sie Ihre Verbindung und versuchen Sie es erneut.',
  stale: (button) => `Sie haben Ihre Werte geändert. Die Antwort unten gilt noch für die vorherigen; klicken Sie auf „${button}“, um sie zu aktualisieren.`,
  unusualHeading: 'Diese Werte sind für diesen Rechner ungewöhnlich',
  unusualBody: (nearest) =>
    `Sie ähneln den Daten, auf denen er beruht, kaum, daher beschreibt keine der Gruppen sie gut. Am nächsten liegt ${nearest}; lesen Sie die Prozentangaben unten mit diesem Vorbehalt.`,
  mostLike: 'Am ähnlichsten:',
  notUsed: (labels) =>
    `Berechnet ohne ${joinNames(labels, 'und')} (leer gelassen): Die Antwort stützt sich nur auf die übrigen Werte, für leere Felder wird nichts geschätzt.`,
  generalCaution:
    'Die Wahrscheinlichkeiten beschreiben, wie ähnlich Ihre Werte den Gruppen in den Daten des Herausgebers sind. Sie sind keine Diagnose, keine Bewertung und keine Entscheidung über Sie.',
  over: (percent) => `über ${percent}`,
  under: (percent) => `unter ${percent}`,
  chartFailed: 'Das Diagramm konnte nicht gezeichnet werden; die Zahlen stehen unten.',
  chartList: 'Zugehörigkeitswahrscheinlichkeit je Gruppe',

  report: {
    open: 'Diesen Rechner melden',
    intro: 'Meldungen gehen an den Partwise-Support, der einen Rechner sperren kann.',
    reasonLabel: 'Grund',
    choose: 'Bitte wählen…',
    reasons: {
      misleading: 'Er gibt irreführende oder schädliche Ratschläge',
      impersonation: 'Er gibt sich als jemand aus, der er nicht ist',
      offensive: 'Seine Texte oder Bezeichnungen sind beleidigend',
      privacy: 'Er fragt nach Werten, die ihn nichts angehen',
      other: 'Etwas anderes',
    },
    chooseReason: 'Bitte wählen Sie einen Grund.',
    messageLabel: 'Was stimmt nicht?',
    messageTooShort: 'Bitte beschreiben Sie in ein, zwei Sätzen, was nicht stimmt (mindestens 10 Zeichen).',
    emailLabel: 'Ihre E-Mail-Adresse (freiwillig, falls wir nachfragen dürfen)',
    emailInvalid: 'Bitte geben Sie eine E-Mail-Adresse wie name@example.org ein oder lassen Sie das Feld leer.',
    sendFailed: 'Die Meldung konnte nicht gesendet werden. Bitte versuchen Sie es später erneut.',
    sending: 'Wird gesendet…',
    send: 'Meldung senden',
    thanks: 'Vielen Dank. Der Partwise-Support wird sich diesen Rechner ansehen.',
  },

  reason: {
    heading: 'Warum diese Gruppe',
    intro: (best, runnerUp) => `Wie jeder Wert zwischen ${best} und der nächstähnlichen Gruppe, ${runnerUp}, abwägt:`,
    bands: {
      well_below: 'deutlich unter dem üblichen Bereich',
      below: 'unter dem üblichen Bereich',
      typical: 'im üblichen Bereich',
      above: 'über dem üblichen Bereich',
      well_above: 'deutlich über dem üblichen Bereich',
    },
    position: (field, band) => `${field}: ${band} dieser Gruppe.`,
    towards: (group, strong) => `Spricht ${strong ? 'deutlich ' : ''}für ${group}.`,
    neither: 'Spricht für keine der beiden Gruppen.',
    groupSize: 'Wie häufig jede Gruppe ist:',
    equallyCommon: 'Die beiden Gruppen kommen in den Daten etwa gleich häufig vor.',
    groupSizeTowards: (larger) => `${larger} ist in den Daten die häufigere Gruppe, was für sie spricht.`,
    inOrder: 'Jeder Wert wird nach den darüber stehenden gewichtet; ein Wert, der nur wiederholt, was ein früherer schon gesagt hat, zählt daher wenig.',
    chartLabel: (best, runnerUp) => `Wie stark jeder Wert für ${best} (rechts) oder ${runnerUp} (links) spricht`,
  },

  page: {
    unavailableHeading: 'Dieser Rechner ist nicht verfügbar',
    unavailableBody: 'Möglicherweise hat der Herausgeber ihn offline genommen. Bitte versuchen Sie es später erneut.',
    missingHeading: 'Unter dieser Adresse gibt es keinen Rechner',
    missingBody:
      'Vielleicht ist die Adresse falsch geschrieben, oder der Herausgeber hat sie durch eine neue ersetzt. Die Website, die hierher verlinkt, kann Ihnen die aktuelle Adresse nennen.',
    errorHeading: 'Dieser Rechner kann gerade nicht angezeigt werden',
    errorBody: 'Bei uns ist etwas schiefgegangen. Bitte versuchen Sie es gleich noch einmal.',
    tryAgain: 'Erneut versuchen',
  },
};

/** Les textes fixes du calculateur en français (vouvoiement). */
import { joinNames, type Messages } from './en';

const unitAfter = (unit: string) => (unit ? ` ${unit}` : '');

export const fr: Messages = {
  intro: 'Saisissez vos valeurs pour voir à quel point elles ressemblent à chaque groupe.',
  optionalMark: 'facultatif',
  optionalHint: 'Vous pouvez laisser ce champ vide.',
  accepted: (min, max, unit) => `Valeurs acceptées : de ${min} à ${max}${unitAfter(unit)}.`,
  fieldRequired: (label) => `Veuillez indiquer une valeur pour « ${label} ».`,
  notNumber: (label, example) => `« ${label} » doit être un nombre, écrit par exemple ${example}.`,
  ambiguous: (label, example) => `« ${label} » peut se lire de plusieurs façons. Veuillez écrire le nombre comme ${example}.`,
  outOfRange: (label, min, max, unit) => `« ${label} » doit être compris entre ${min} et ${max}${unitAfter(unit)}.`,
  fieldRefused: (label) => `« ${label} » n’a pas pu être utilisé. Veuillez vérifier la valeur.`,
  submit: 'Voir mes groupes',
  busy: 'Calcul en cours…',
  resultLabel: 'Résultat',
  alreadyShown: 'La réponse ci-dessous correspond déjà à ces valeurs. Modifiez une valeur pour en obtenir une nouvelle.',
  someValuesUnusable: 'Certaines valeurs n’ont pas pu être utilisées.',
  tooMany: (seconds) => `Cela fait beaucoup d’essais en peu de temps. Veuillez patienter ${seconds ? `${seconds} secondes` : 'un instant'} avant de réessayer.`,
  paused: 'Ce calculateur fait une courte pause et répondra de nouveau bientôt. Vos valeurs ne sont pas en cause.',
  gone: 'Ce calculateur n’est plus disponible.',
  serverProblem: 'Un problème est survenu de notre côté. Veuillez réessayer.',
  offline: 'La réponse n’a pas pu être obtenue. Vérifiez votre connexion et réessayez.',
  stale: (button) => `Vous avez modifié vos valeurs. La réponse ci-dessous correspond aux précédentes ; appuyez sur « ${button} » pour la mettre à jour.`,
  unusualHeading: 'Ces valeurs sont inhabituelles pour ce calculateur',
  unusualBody: (nearest) =>
    `Elles diffèrent des données à partir desquelles il a été construit, si bien qu’aucun groupe ne les décrit bien. Le plus proche est ${nearest} ; lisez les pourcentages ci-dessous en gardant cela à l’esprit.`,
  mostLike: 'Le plus proche :',
  notUsed: (labels) =>
    `Calculé sans ${joinNames(labels, 'et')}, laissé${labels.length === 1 ? '' : 's'} vide${labels.length === 1 ? '' : 's'} : la réponse n’utilise que les autres valeurs, rien n’est deviné à la place.`,
  generalCaution:
    'Les probabilités décrivent à quel point vos valeurs ressemblent aux groupes trouvés dans les données de l’éditeur. Elles ne constituent ni un diagnostic, ni une évaluation, ni une décision vous concernant.',
  over: (percent) => `plus de ${percent}`,
  under: (percent) => `moins de ${percent}`,
  chartFailed: 'Le graphique n’a pas pu être affiché ; les chiffres figurent ci-dessous.',
  chartList: 'Probabilité d’appartenance par groupe',

  report: {
    open: 'Signaler ce calculateur',
    intro: 'Les signalements sont envoyés à l’assistance Partwise, qui peut retirer un calculateur.',
    reasonLabel: 'Motif',
    choose: 'Choisir…',
    reasons: {
      misleading: 'Il donne des conseils trompeurs ou nuisibles',
      impersonation: 'Il se fait passer pour quelqu’un d’autre',
      offensive: 'Ses textes ou intitulés sont choquants',
      privacy: 'Il demande des valeurs qu’il ne devrait pas demander',
      other: 'Autre chose',
    },
    chooseReason: 'Veuillez choisir un motif.',
    messageLabel: 'Quel est le problème ?',
    messageTooShort: 'Décrivez le problème en une ou deux phrases (au moins 10 caractères).',
    emailLabel: 'Votre adresse e-mail (facultative, si nous pouvons vous recontacter)',
    emailInvalid: 'Indiquez une adresse e-mail comme nom@example.org, ou laissez le champ vide.',
    sendFailed: 'Le signalement n’a pas pu être envoyé. Veuillez réessayer plus tard.',
    sending: 'Envoi en cours…',
    send: 'Envoyer le signalement',
    thanks: 'Merci. L’assistance Partwise examinera ce calculateur.',
  },

  reason: {
    heading: 'Pourquoi ce groupe',
    intro: (best, runnerUp) => `Le poids de chaque valeur entre ${best} et le groupe suivant le plus proche, ${runnerUp} :`,
    bands: {
      well_below: 'bien en dessous de la plage habituelle',
      below: 'en dessous de la plage habituelle',
      typical: 'dans la plage habituelle',
      above: 'au-dessus de la plage habituelle',
      well_above: 'bien au-dessus de la plage habituelle',
    },
    position: (field, band) => `${field} : ${band} pour ce groupe.`,
    towards: (group, strong) => `Penche ${strong ? 'nettement ' : ''}vers ${group}.`,
    neither: 'Ne penche vers aucun des deux groupes.',
    groupSize: 'Fréquence de chaque groupe :',
    equallyCommon: 'Les deux groupes sont à peu près aussi fréquents l’un que l’autre dans les données.',
    groupSizeTowards: (larger) => `${larger} est le groupe le plus fréquent dans les données, ce qui joue en sa faveur.`,
    inOrder: 'Chaque valeur est pesée après celles qui la précèdent : une valeur qui répète ce qu’une autre a déjà indiqué compte donc peu.',
    chartLabel: (best, runnerUp) => `À quel point chaque valeur penche vers ${best} (à droite) ou ${runnerUp} (à gauche)`,
  },

  page: {
    unavailableHeading: 'Ce calculateur n’est pas disponible',
    unavailableBody: 'Son éditeur l’a peut-être mis hors ligne. Veuillez réessayer plus tard.',
    missingHeading: 'Aucun calculateur à cette adresse',
    missingBody:
      'L’adresse est peut-être mal saisie, ou l’éditeur l’a remplacée par une nouvelle. Le site qui vous a mené ici peut vous indiquer l’adresse actuelle.',
    errorHeading: 'Ce calculateur ne peut pas être affiché pour le moment',
    errorBody: 'Un problème est survenu de notre côté. Veuillez réessayer dans un instant.',
    tryAgain: 'Réessayer',
  },
};

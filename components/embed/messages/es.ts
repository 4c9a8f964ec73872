/** Los textos fijos de la calculadora en español (trato de usted). */
import { joinNames, type Messages } from './en';

const unitAfter = (unit: string) => (unit ? ` ${unit}` : '');

export const es: Messages = {
  intro: 'Introduzca sus valores para ver en qué medida se parecen a cada grupo.',
  optionalMark: 'opcional',
  optionalHint: 'Puede dejar este campo en blanco.',
  accepted: (min, max, unit) => `Se admite: de ${min} a ${max}${unitAfter(unit)}.`,
  fieldRequired: (label) => `Introduzca un valor para «${label}».`,
  notNumber: (label, example) => `«${label}» debe ser un número, escrito por ejemplo ${example}.`,
  ambiguous: (label, example) => `«${label}» se puede leer de más de una manera. Escriba el número como ${example}.`,
  outOfRange: (label, min, max, unit) => `«${label}» debe estar entre ${min} y ${max}${unitAfter(unit)}.`,
  fieldRefused: (label) => `No se pudo utilizar «${label}». Compruebe el valor, por favor.`,
  submit: 'Ver mis grupos',
  busy: 'Calculando…',
  resultLabel: 'Resultado',
  alreadyShown: 'La respuesta de abajo ya corresponde a estos valores. Cambie un valor para obtener una nueva.',
  someValuesUnusable: 'Algunos valores no se pudieron utilizar.',
  tooMany: (seconds) => `Han sido muchos intentos en poco tiempo. Espere ${seconds ? `${seconds} segundos` : 'un momento'} y vuelva a intentarlo, por favor.`,
  paused: 'Esta calculadora se está tomando un breve descanso y volverá a responder pronto. Sus valores están bien.',
  gone: 'Esta calculadora ya no está disponible.',
  serverProblem: 'Algo ha fallado por nuestra parte. Vuelva a intentarlo, por favor.',
  offline: 'No se pudo obtener la respuesta. Compruebe su conexión y vuelva a intentarlo.',
  stale: (button) => `Ha cambiado sus valores. La respuesta de abajo corresponde a los anteriores; pulse «${button}» para actualizarla.`,
  unusualHeading: 'Estos valores son poco habituales para esta calculadora',
  unusualBody: (nearest) =>
    `Se alejan de los datos con los que se creó, de modo que ningún grupo los describe bien. El más cercano es ${nearest}; tenga esto en cuenta al leer los porcentajes de abajo.`,
  mostLike: 'Más parecido a:',
  notUsed: (labels) =>
    `Calculado sin ${joinNames(labels, 'y')}, que dejó en blanco: la respuesta usa solo los demás valores y no se supone nada en su lugar.`,
  generalCaution:
    'Las probabilidades describen en qué medida sus valores se parecen a los grupos hallados en los datos del editor. No son un diagnóstico, ni una valoración, ni una decisión sobre usted.',
  over: (percent) => `más del ${percent}`,
  under: (percent) => `menos del ${percent}`,
  chartFailed: 'No se pudo dibujar el gráfico; las cifras aparecen abajo.',
  chartList: 'Probabilidad de pertenencia por grupo',

  report: {
    open: 'Denunciar esta calculadora',
    intro: 'Las denuncias llegan al equipo de asistencia de Partwise, que puede retirar una calculadora.',
    reasonLabel: 'Motivo',
    choose: 'Elija…',
    reasons: {
      misleading: 'Da consejos engañosos o perjudiciales',
      impersonation: 'Se hace pasar por quien no es',
      offensive: 'Sus textos o etiquetas son ofensivos',
      privacy: 'Pide valores que no debería pedir',
      other: 'Otro motivo',
    },
    chooseReason: 'Elija un motivo, por favor.',
    messageLabel: '¿Qué ocurre?',
    messageTooShort: 'Cuéntenos en una o dos frases qué ocurre (al menos 10 caracteres).',
    emailLabel: 'Su correo electrónico (opcional, por si podemos hacerle más preguntas)',
    emailInvalid: 'Introduzca un correo como nombre@example.org, o deje el campo vacío.',
    sendFailed: 'No se pudo enviar la denuncia. Vuelva a intentarlo más tarde, por favor.',
    sending: 'Enviando…',
    send: 'Enviar denuncia',
    thanks: 'Gracias. El equipo de asistencia de Partwise revisará esta calculadora.',
  },

  reason: {
    heading: 'Por qué este grupo',
    intro: (best, runnerUp) => `Cómo pesa cada valor entre ${best} y el siguiente grupo más cercano, ${runnerUp}:`,
    bands: {
      well_below: 'muy por debajo del rango habitual',
      below: 'por debajo del rango habitual',
      typical: 'dentro del rango habitual',
      above: 'por encima del rango habitual',
      well_above: 'muy por encima del rango habitual',
    },
    position: (field, band) => `${field}: ${band} de este grupo.`,
    towards: (group, strong) => `Apunta ${strong ? 'claramente ' : ''}hacia ${group}.`,
    neither: 'No apunta hacia ninguno de los dos grupos.',
    groupSize: 'Frecuencia de cada grupo:',
    equallyCommon: 'Los dos grupos son más o menos igual de frecuentes en los datos.',
    groupSizeTowards: (larger) => `${larger} es el grupo más frecuente en los datos, lo que cuenta a su favor.`,
    inOrder: 'Cada valor se pondera después de los que tiene encima, así que un valor que repite lo que ya dijo otro anterior cuenta poco.',
    chartLabel: (best, runnerUp) => `Con qué fuerza apunta cada valor hacia ${best} (derecha) o ${runnerUp} (izquierda)`,
  },

  page: {
    unavailableHeading: 'Esta calculadora no está disponible',
    unavailableBody: 'Es posible que su editor la haya desconectado. Vuelva a intentarlo más tarde, por favor.',
    missingHeading: 'No hay ninguna calculadora en esta dirección',
    missingBody:
      'Puede que la dirección esté mal escrita o que el editor la haya sustituido por una nueva. El sitio que le ha traído hasta aquí puede darle la dirección actual.',
    errorHeading: 'Ahora mismo no se puede mostrar esta calculadora',
    errorBody: 'Algo ha fallado por nuestra parte. Vuelva a intentarlo dentro de un momento, por favor.',
    tryAgain: 'Volver a intentarlo',
  },
};

import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { nextTick } from 'vue'
import { createVuetify } from 'vuetify'
import NewPasswordField from '../../../../../src/components/auth/NewPasswordField.vue'
import { PASSWORD_RULE } from '../../../../../shared/passwords.ts'

const mountField = (value = '') => mount(NewPasswordField, { props: { modelValue: value, testid: 'pw' }, global: { plugins: [createVuetify()] } })

describe('NewPasswordField', () => {
  it('states the whole rule before anything is typed', () => {
    const text = mountField().text()
    expect(PASSWORD_RULE).toContain('at most 72 bytes')
    expect(text).toContain(PASSWORD_RULE)
  })

  it('says what is wrong with a common password as it is typed', async () => {
    const w = mountField()
    await w.get('input').setValue('qwertyuiop')
    await nextTick(); await nextTick()
    expect(w.text()).toContain('This is one of the most common passwords; choose another')
  })
})
